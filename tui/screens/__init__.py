"""The pad's screens: typing, replay, sweep, model, learned words and help (dialogs are in ..dialogs)."""
