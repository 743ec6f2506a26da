"""Every file format the project writes, one module per format."""
