"""Writes the small MSH 4.1 fixtures read by tests/io_msh_fixtures.rs.

The files are written by meshio (PyPI `meshio`, a general-purpose mesh I/O library), so the
MSH reader is tested against an independent writer. Run from this folder:

    pip install meshio
    python make_msh_fixtures.py

Meshes (meshio takes VTK node order and converts to Gmsh's on writing):
  * tri6: the rectangle [0,2]x[0,1] as 2x1 squares, each split into two 6-node triangles along
    its (0,0)-(1,1) diagonal: 4 triangles, 15 nodes, z = 0. One cell block, so meshio writes no
    $Entities and entity tag 0.
  * tet10: the box [0,2]x[0,1]x[0,3] split into six 10-node tetrahedra around its main diagonal
    (the same mesh as make_vtu_fixtures.py), plus the two 6-node triangles of its z = 0 face
    as a boundary group written FIRST (element tags 1-2, tetrahedra 3-8). Nodes on z = 0 belong
    to entity (2, 5), the others to (3, 1), so the $Nodes section has two blocks and node tags
    are not in file order. $Entities: surface 5 with physical tag 9, volume 1 with physical 7.

Arrays (the values the test checks, from these formulas):
  * point 'displacement' (3 components) = (0.001 x, -0.002 y, 0.0005 z)   -> $NodeData
  * cell 'zone' = 100 + index of the cell over all blocks in file order  -> $ElementData
    (so the tetrahedra carry 102..107; the boundary rows 100, 101 must be ignored)

Variants: ascii and binary (little-endian, size_t = 8, as meshio writes on this machine).
Coordinates are written with 17 significant digits (ascii) or as raw doubles, so every value
reads back exactly.
"""

import meshio
import numpy as np

from make_vtu_fixtures import add_mid_nodes, tet10

# meshio 5.3.5 writes ASCII data rows with repr(); under NumPy 2 that gives "np.float64(0.5)"
# instead of "0.5". The legacy print mode restores the plain form.
np.set_printoptions(legacy="1.25")

TRI_EDGES = [(0, 1), (1, 2), (2, 0)]


def tri6():
    add_mid_nodes.cache = {}
    points = [[float(i), float(j), 0.0] for j in (0, 1) for i in (0, 1, 2)]

    def vid(i, j):
        return i + 3 * j

    tris = []
    for i in (0, 1):
        for tri in ([vid(i, 0), vid(i + 1, 0), vid(i + 1, 1)],
                    [vid(i, 0), vid(i + 1, 1), vid(i, 1)]):
            tris.append(tri + add_mid_nodes(points, tri, TRI_EDGES))
    return np.array(points), [("triangle6", np.array(tris))]


def tet10_with_boundary():
    points, cells = tet10()
    tets = cells[0][1]
    points = [list(p) for p in points]
    # Corners of the z = 0 face among each tetrahedron's faces; mid nodes already exist.
    add_mid_nodes.cache = {}
    for t in tets:
        for k, (a, b) in enumerate([(0, 1), (1, 2), (2, 0), (0, 3), (1, 3), (2, 3)]):
            key = (min(t[a], t[b]), max(t[a], t[b]))
            add_mid_nodes.cache[key] = t[4 + k]
    tris = []
    for t in tets:
        for face in ([0, 2, 1], [0, 1, 3], [1, 2, 3], [0, 3, 2]):
            corners = [int(t[f]) for f in face]
            if all(points[c][2] == 0.0 for c in corners):
                tris.append(corners + add_mid_nodes(points, corners, TRI_EDGES))
    assert len(tris) == 2
    return np.array(points), [("triangle6", np.array(tris)), ("tetra10", tets)]


def with_data(points, cells, boundary):
    x, y, z = points[:, 0], points[:, 1], points[:, 2]
    displacement = np.column_stack([0.001 * x, -0.002 * y, 0.0005 * z])
    zone = []
    start = 0
    for _, block in cells:
        zone.append((100 + start + np.arange(len(block))).astype(np.float64))
        start += len(block)
    point_data = {"displacement": displacement}
    cell_data = {"zone": zone}
    if boundary:
        on_face = z == 0.0
        point_data["gmsh:dim_tags"] = np.column_stack(
            [np.where(on_face, 2, 3), np.where(on_face, 5, 1)])
        cell_data["gmsh:physical"] = [np.full(len(b), tag) for (_, b), tag in zip(cells, (9, 7))]
        cell_data["gmsh:geometrical"] = [np.full(len(b), tag)
                                         for (_, b), tag in zip(cells, (5, 1))]
    return meshio.Mesh(points, cells, point_data=point_data, cell_data=cell_data)


def main():
    for name, (points, cells), boundary in (("tri6", tri6(), False),
                                            ("tet10", tet10_with_boundary(), True)):
        for suffix, binary in (("ascii", False), ("binary", True)):
            mesh = with_data(points, cells, boundary)
            meshio.gmsh.write(f"meshio_{name}_{suffix}.msh", mesh, binary=binary)


if __name__ == "__main__":
    main()
