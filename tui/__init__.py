"""The typing pad: a Textual interface over the engine."""
