"""FLOW 3 (desktop side of the onboard watch): parameter set -> CONFIG -> bundle | replay | plots."""
