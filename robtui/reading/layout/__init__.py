"""Layout analysis of PDF pages: glyphs -> lines -> columns -> blocks in reading order.

glyphs.py reads a page's characters, rules and image count with pypdfium2 (PDFium's own text
layer, in content-stream order); lines.py groups glyphs into words and lines by baseline;
columns.py finds gutters in the page's whitespace and orders blocks as a reader would;
blocks.py names the blocks (heading, caption, table, aside) and drops running heads.
"""
