"""The INVENTED demo scenario: its vehicle, a bench-sweep simulator and a flight simulator.

Nothing here is measured data; every number is made up for the demonstration."""
