"""Writes the small .vtu fixtures read by tests/io_meshio_fixtures.rs.

The files are written by meshio (PyPI `meshio`, a general-purpose mesh I/O library), so the
reader is tested against an independent writer. Run from this folder:

    pip install meshio
    python make_vtu_fixtures.py

Meshes (node order is VTK's, which is also meshio's):
  * quad8_tri6: one 8-node quad on [0,1]x[0,1] and two 6-node triangles on [1,2.5]x[0,1], z = 0.
  * tet10: the box [0,2]x[0,1]x[0,3] split into six 10-node tetrahedra around its main diagonal.

Arrays:
  * point 'displacement' (Float64, 3 components) = (0.001 x, -0.002 y, 0.0005 z)
  * point 'temperature' (Float32) = x + 2 y + 3 z
  * cell 'zone' (Int32) = 100 + index of the cell in file order

Variants: ascii, binary (uncompressed), binary zlib; for tet10 also zlib with a UInt64 header
and an lzma-compressed file (which the reader must refuse with a clear error).

It also writes hand_bigendian_header_alone.vtu without meshio, byte by byte (struct + base64):
BigEndian, UInt32 header words (version 0.1, no header_type), inline base64 with the length
header encoded on its own (padding right after it), one base64 text wrapped over lines, plus
things a reader must skip (FieldData, InformationKey, unknown attributes, a comment).
Mesh: quad (0,1,2,3) and triangle (1,4,2) over points (0,0,0) (1,0,0) (1,1,0) (0,1,0) (2,0.5,0);
point 'displacement' (Float64 x3) as above, point 'label' (UInt16) = 1000 + index,
cell 'zone' (Int16) = (-5, 7), cell 'sign' (Int8, ascii) = (-1, 1).
"""

import base64
import struct

import meshio
import numpy as np


def add_mid_nodes(points, corners, edges):
    """Returns the ids of the mid-edge nodes of a cell, creating shared nodes as needed."""
    ids = []
    for a, b in edges:
        key = (min(corners[a], corners[b]), max(corners[a], corners[b]))
        if key not in add_mid_nodes.cache:
            p = 0.5 * (np.asarray(points[key[0]]) + np.asarray(points[key[1]]))
            points.append(list(p))
            add_mid_nodes.cache[key] = len(points) - 1
        ids.append(add_mid_nodes.cache[key])
    return ids


def quad8_tri6():
    add_mid_nodes.cache = {}
    points = [[0.0, 0.0, 0.0], [1.0, 0.0, 0.0], [1.0, 1.0, 0.0], [0.0, 1.0, 0.0],
              [2.5, 0.0, 0.0], [2.5, 1.0, 0.0]]
    quad_edges = [(0, 1), (1, 2), (2, 3), (3, 0)]
    tri_edges = [(0, 1), (1, 2), (2, 0)]
    quad = [0, 1, 2, 3]
    quads = [quad + add_mid_nodes(points, quad, quad_edges)]
    tris = []
    for tri in ([1, 4, 5], [1, 5, 2]):
        tris.append(tri + add_mid_nodes(points, tri, tri_edges))
    cells = [("triangle6", np.array(tris)), ("quad8", np.array(quads))]
    return np.array(points), cells


def tet10():
    add_mid_nodes.cache = {}
    size = np.array([2.0, 1.0, 3.0])
    corners = [[i, j, k] for k in (0, 1) for j in (0, 1) for i in (0, 1)]
    points = [list(np.array(c, dtype=float) * size) for c in corners]

    def vid(i, j, k):
        return i + 2 * j + 4 * k

    # Kuhn split: each path from (0,0,0) to (1,1,1) along the axes gives one tetrahedron.
    tets = []
    for order in ([0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]):
        at = [0, 0, 0]
        path = [vid(*at)]
        for axis in order:
            at[axis] = 1
            path.append(vid(*at))
        a, b, c, d = path
        # Orient so that (a, b, c) points towards d (positive volume).
        pa, pb, pc, pd = (np.array(points[v]) for v in (a, b, c, d))
        if np.dot(np.cross(pb - pa, pc - pa), pd - pa) < 0:
            b, c = c, b
        tet = [a, b, c, d]
        edges = [(0, 1), (1, 2), (2, 0), (0, 3), (1, 3), (2, 3)]
        tets.append(tet + add_mid_nodes(points, tet, edges))
    return np.array(points), [("tetra10", np.array(tets))]


def tet10_block(n, size):
    """A box of n[0] x n[1] x n[2] cubes, each split into six 10-node tetrahedra (Kuhn)."""
    add_mid_nodes.cache = {}
    size = np.asarray(size, dtype=float)
    nx, ny, nz = n

    def vid(i, j, k):
        return i + (nx + 1) * (j + (ny + 1) * k)

    points = [[i * size[0] / nx, j * size[1] / ny, k * size[2] / nz]
              for k in range(nz + 1) for j in range(ny + 1) for i in range(nx + 1)]
    tets = []
    for k in range(nz):
        for j in range(ny):
            for i in range(nx):
                for order in ([0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]):
                    at = [i, j, k]
                    path = [vid(*at)]
                    for axis in order:
                        at[axis] += 1
                        path.append(vid(*at))
                    a, b, c, d = path
                    pa, pb, pc, pd = (np.array(points[v]) for v in (a, b, c, d))
                    if np.dot(np.cross(pb - pa, pc - pa), pd - pa) < 0:
                        b, c = c, b
                    tet = [a, b, c, d]
                    edges = [(0, 1), (1, 2), (2, 0), (0, 3), (1, 3), (2, 3)]
                    tets.append(tet + add_mid_nodes(points, tet, edges))
    return np.array(points), [("tetra10", np.array(tets))]


def smooth_bracket():
    """meshio_bracket_tet10_zlib.vtu: a 4 x 2 x 2 block of tet10 cells (96 cells) with a smooth,
    non-polynomial point array 'Displacement' (capitalised on purpose), zlib-compressed, so
    that the estimate on a file from another program has a non-zero error to report."""
    points, cells = tet10_block((4, 2, 2), (4.0, 2.0, 2.0))
    x, y, z = points[:, 0], points[:, 1], points[:, 2]
    displacement = np.column_stack([
        1e-3 * (np.sin(0.8 * x) + 0.1 * y * y),
        1e-3 * np.cos(0.5 * x + 0.3 * z),
        2e-4 * x * y,
    ]).astype(np.float64)
    mesh = meshio.Mesh(points, cells, point_data={"Displacement": displacement})
    meshio.vtu.write("meshio_bracket_tet10_zlib.vtu", mesh, binary=True, compression="zlib")


def mesh_with_data(points, cells):
    x, y, z = points[:, 0], points[:, 1], points[:, 2]
    displacement = np.column_stack([0.001 * x, -0.002 * y, 0.0005 * z]).astype(np.float64)
    temperature = (x + 2.0 * y + 3.0 * z).astype(np.float32)
    zone = []
    start = 0
    for _, block in cells:
        zone.append((100 + start + np.arange(len(block))).astype(np.int32))
        start += len(block)
    return meshio.Mesh(
        points,
        cells,
        point_data={"displacement": displacement, "temperature": temperature},
        cell_data={"zone": zone},
    )


def main():
    for name, (points, cells) in (("quad8_tri6", quad8_tri6()), ("tet10", tet10())):
        variants = [("ascii", dict(binary=False)),
                    ("binary", dict(binary=True, compression=None)),
                    ("zlib", dict(binary=True, compression="zlib"))]
        if name == "tet10":
            variants.append(("zlib_uint64", dict(binary=True, compression="zlib",
                                                 header_type="UInt64")))
            variants.append(("lzma", dict(binary=True, compression="lzma")))
        for suffix, kwargs in variants:
            mesh = mesh_with_data(points, cells)
            meshio.vtu.write(f"meshio_{name}_{suffix}.vtu", mesh, **kwargs)
    smooth_bracket()


def b64_header_alone(fmt, values):
    """Big-endian values as base64, the UInt32 byte count encoded separately first."""
    data = struct.pack(">" + fmt * len(values), *values)
    return (base64.b64encode(struct.pack(">I", len(data))) + base64.b64encode(data)).decode()


def hand_made_big_endian():
    points = [(0.0, 0.0, 0.0), (1.0, 0.0, 0.0), (1.0, 1.0, 0.0), (0.0, 1.0, 0.0), (2.0, 0.5, 0.0)]
    flat = [c for p in points for c in p]
    disp = [v for x, y, z in points for v in (0.001 * x, -0.002 * y, 0.0005 * z)]
    disp_b64 = b64_header_alone("d", disp)
    wrapped = "\n          ".join(disp_b64[i:i + 40] for i in range(0, len(disp_b64), 40))
    text = f"""<?xml version="1.0"?>
<!-- hand-made test file: BigEndian, UInt32 headers, base64 header encoded alone -->
<VTKFile type="UnstructuredGrid" version="0.1" byte_order="BigEndian" made_by="hand">
  <UnstructuredGrid>
    <FieldData>
      <DataArray type="Float64" Name="TimeValue" NumberOfTuples="1" format="ascii">1.5</DataArray>
    </FieldData>
    <Piece NumberOfPoints="5" NumberOfCells="2">
      <PointData Vectors="displacement">
        <DataArray type="Float64" Name="displacement" NumberOfComponents="3" format="binary" RangeMin="0" RangeMax="0.0022">
          <InformationKey name="L2_NORM_RANGE" location="vtkDataArray" length="2">
            <Value index="0">0</Value>
            <Value index="1">0.0022</Value>
          </InformationKey>
          {wrapped}
        </DataArray>
        <DataArray type="UInt16" Name="label" format="binary">{b64_header_alone("H", [1000 + i for i in range(5)])}</DataArray>
      </PointData>
      <CellData>
        <DataArray type="Int16" Name="zone" format="binary">{b64_header_alone("h", [-5, 7])}</DataArray>
        <DataArray type="Int8" Name="sign" format="ascii">	-1	1	</DataArray>
      </CellData>
      <Points>
        <DataArray type="Float32" Name="Points" NumberOfComponents="3" format="binary">{b64_header_alone("f", flat)}</DataArray>
      </Points>
      <Cells>
        <DataArray type="Int32" Name="connectivity" format="binary">{b64_header_alone("i", [0, 1, 2, 3, 1, 4, 2])}</DataArray>
        <DataArray type="UInt32" Name="offsets" format="binary">{b64_header_alone("I", [4, 7])}</DataArray>
        <DataArray type="UInt8" Name="types" format="binary">{b64_header_alone("B", [9, 5])}</DataArray>
      </Cells>
    </Piece>
  </UnstructuredGrid>
</VTKFile>
"""
    with open("hand_bigendian_header_alone.vtu", "w") as f:
        f.write(text)


if __name__ == "__main__":
    main()
    hand_made_big_endian()
