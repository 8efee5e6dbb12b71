"""The pad's dialogs: small screens over the current one that ask one thing and close."""
