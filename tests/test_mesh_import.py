"""Sections read from mesh files: gmsh physical groups become edge groups and regions.

The files are written here with gmsh's own API (not the project's meshing code) or with
meshio, and the facts read back are checked against elementary geometry: a 40 mm x 20 mm plate
with a 5 mm-radius bore has area 800 − 25π mm², outer perimeter 120 mm and a bore of length
10π mm (the P1 chord error of the bore is below (π²/6)·(h/r)² relative for h the chord length).
"""

import math

import gmsh
import meshio
import numpy as np
import pytest

from geometries import GeometryError, read_section_mesh


def write_plate_msh(path, *, order=1, label_outer=True):
    """A 40 x 20 plate (in mm) with a centred bore of radius 5, physical groups named."""
    gmsh.initialize()
    try:
        gmsh.option.setNumber("General.Terminal", 0)
        occ = gmsh.model.occ
        plate = occ.addRectangle(0, 0, 0, 40, 20)
        bore = occ.addDisk(20, 10, 0, 5, 5)
        occ.cut([(2, plate)], [(2, bore)])
        occ.synchronize()
        curves = [tag for _, tag in gmsh.model.getEntities(1)]
        bore_curves = [c for c in curves if abs(occ.getMass(1, c) - 10 * math.pi) < 1e-6]
        gmsh.model.addPhysicalGroup(1, bore_curves, name="bore")
        if label_outer:
            outer = [c for c in curves if c not in bore_curves]
            gmsh.model.addPhysicalGroup(1, outer, name="outside")
        surfaces = [tag for _, tag in gmsh.model.getEntities(2)]
        gmsh.model.addPhysicalGroup(2, surfaces, name="steel")
        gmsh.option.setNumber("Mesh.MeshSizeMax", 1.0)
        gmsh.model.mesh.generate(2)
        if order == 2:
            gmsh.model.mesh.setOrder(2)
        gmsh.write(str(path))
    finally:
        gmsh.finalize()


@pytest.mark.parametrize("order", [1, 2])
def test_msh_physical_groups_become_groups_and_regions(tmp_path, order):
    path = tmp_path / "plate.msh"
    write_plate_msh(path, order=order)
    section = read_section_mesh(path, units="mm")
    assert sorted(section.edge_groups) == ["bore", "outside"]
    assert list(section.regions) == ["steel"]
    claimed = np.concatenate(list(section.edge_groups.values()))
    assert sorted(claimed) == sorted(section.mesh.boundary_facets())
    facts = section.facts
    exact_area = (800 - 25 * math.pi) * 1e-6
    exact_bore = 10 * math.pi * 1e-3
    # P1: chord error of the bore with ~1 mm chords on r = 5 mm, about (1/5)^2/24 of the
    # circle's area share; quadratic triangles follow the arc, leaving ~1e-6 relative.
    tolerance = 2e-3 if order == 1 else 1e-5
    assert facts.area == pytest.approx(exact_area, rel=tolerance)
    assert facts.edge_lengths["bore"] == pytest.approx(exact_bore, rel=tolerance)
    assert facts.edge_lengths["outside"] == pytest.approx(0.120, rel=1e-12)
    assert facts.centroid == pytest.approx((0.020, 0.010), abs=1e-9)


def test_unlabelled_boundary_lines_are_refused(tmp_path):
    path = tmp_path / "plate.msh"
    write_plate_msh(path, label_outer=False)
    with pytest.raises(GeometryError, match="belong to no edge group"):
        read_section_mesh(path, units="mm")


def test_label_array_round_trip_through_vtu(tmp_path):
    # Two triangles of a 2 m x 1 m rectangle with its four sides as labelled lines.
    points = np.array([[0, 0, 0], [2, 0, 0], [2, 1, 0], [0, 1, 0]], dtype=float)
    cells = [
        ("triangle", np.array([[0, 1, 2], [0, 2, 3]])),
        ("line", np.array([[0, 1], [1, 2], [2, 3], [3, 0]])),
    ]
    label = [np.array([7, 7]), np.array([1, 2, 1, 2])]
    path = tmp_path / "plate.vtu"
    meshio.write(path, meshio.Mesh(points, cells, cell_data={"label": label}))
    section = read_section_mesh(path, label_array="label")
    assert sorted(section.edge_groups) == ["label_1", "label_2"]
    assert list(section.regions) == ["label_7"]
    assert section.facts.edge_lengths == pytest.approx({"label_1": 4.0, "label_2": 2.0})
    assert section.facts.area == pytest.approx(2.0)


def test_bad_files_are_refused(tmp_path):
    with pytest.raises(GeometryError, match="does not exist"):
        read_section_mesh(tmp_path / "missing.msh")
    with pytest.raises(GeometryError, match="units must be one of"):
        read_section_mesh(tmp_path / "missing.msh", units="furlong")
    quads = tmp_path / "quads.vtu"
    square = np.array([[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0]], dtype=float)
    meshio.write(quads, meshio.Mesh(square, [("quad", np.array([[0, 1, 2, 3]]))]))
    with pytest.raises(GeometryError, match=r"cells of type \['quad'\] are not supported"):
        read_section_mesh(quads)
    tilted = tmp_path / "tilted.vtu"
    lifted = square + np.array([0, 0, 1]) * square[:, :1]
    meshio.write(tilted, meshio.Mesh(lifted, [("triangle", np.array([[0, 1, 2]]))]))
    with pytest.raises(GeometryError, match="not planar"):
        read_section_mesh(tilted)
    garbage = tmp_path / "garbage.msh"
    garbage.write_text("this is not a mesh\n")
    with pytest.raises(GeometryError, match="meshio cannot read"):
        read_section_mesh(garbage)
