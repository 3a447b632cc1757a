"""Server: delivers findings (command line, language server, output formats, reports)."""
