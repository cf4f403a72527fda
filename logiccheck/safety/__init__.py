"""Data safety: CSV files that read back exactly, outputs that never replace inputs,
output sets that appear whole, and text that cannot drive a terminal or a spreadsheet."""
