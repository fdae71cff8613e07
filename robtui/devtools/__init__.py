"""Development helpers (rendering test PDFs); they need the ``dev`` extra."""
