"""Files in and out: scenario and load-case tables read into inputs (reading a file never
solves), proposed layouts, and every file the package writes (design JSON, CSV tables,
SVG and DXF drawings, multi-case JSON)."""
