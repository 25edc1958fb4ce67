"""Reads a .vti written by src/core/io/vti.ts with Python's xml.etree and numpy only (no VTK library), for
test/core/io/vti.test.ts. VTK XML ImageData (Kitware, "VTK File Formats"): WholeExtent in points, Origin and
Spacing of the points, cell data listed with x varying fastest, then y, then z.
Input {"text"}; output {"extent", "origin", "spacing", "fields": {name: values reshaped [iz][iy][ix]}}.
"""
import json
import sys
import xml.etree.ElementTree as ET

import numpy as np

p = json.load(sys.stdin)
root = ET.fromstring(p["text"])
assert root.tag == "VTKFile" and root.get("type") == "ImageData", root.attrib
img = root.find("ImageData")
ext = [int(v) for v in img.get("WholeExtent").split()]
nx, ny, nz = ext[1] - ext[0], ext[3] - ext[2], ext[5] - ext[4]
fields = {}
for arr in img.find("Piece").find("CellData").findall("DataArray"):
    vals = np.array(arr.text.split(), dtype=float)
    fields[arr.get("Name")] = vals.reshape(nz, ny, nx).tolist()
print(json.dumps({
    "extent": ext,
    "origin": [float(v) for v in img.get("Origin").split()],
    "spacing": [float(v) for v in img.get("Spacing").split()],
    "fields": fields,
}))
