"""Modal screens: forms, confirmations, details."""
