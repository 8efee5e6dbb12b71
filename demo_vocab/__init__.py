"""The bundled demo text: invented messages of an invented ferry cooperative (see README.md here)."""
