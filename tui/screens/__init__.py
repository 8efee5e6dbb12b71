"""The pad's screens: typing, replay, sweep, model, help and dialogs."""
