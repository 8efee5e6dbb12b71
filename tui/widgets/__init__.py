"""The pad's widgets: the composing area and the panels around it."""
