"""Stage 1, DXF → Drawing: sniffing the file, the full reader (ezdxf) and the
fast reader for big ASCII files, the block walk and the drawing's units."""
