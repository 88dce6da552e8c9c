"""One module per flow; each imports heavy libraries (numpy, matplotlib) only inside its commands."""
