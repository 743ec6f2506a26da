"""Case files: a whole analysis in one TOML file of our own layout, read into a :class:`Case`.

The loader checks everything it can before any meshing or solving — unknown keys (with a
suggestion), missing values, quantities of the wrong kind, impossible values, and edge groups
named in the boundaries but absent from the section or the other way round — and reports the
first problem as a :class:`CaseError` with the key path and, where it can find it, the line.
The README documents the format with a complete annotated example.
"""

from __future__ import annotations

import copy
import sys
from dataclasses import dataclass, field
from pathlib import Path

from fem import ThermalModel, bind_correlations
from geometries import Section, SectionMesh

from .conditions import read_boundaries, read_initial, read_probes, read_sources
from .interfaces import read_interfaces
from .materials import WHOLE_SECTION, read_materials
from .options import read_advisor, read_outputs, read_run
from .reach import check_regions_named, check_stop_reachable
from .reader import DEEPEST, CaseError, Context, Table, check_tree, echo, nesting_key, shown_path
from .sections import read_section
from .validation import LIBRARY_ERRORS

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

__all__ = ["Case", "CaseError", "case_from_data", "case_from_toml", "load_case"]


@dataclass(frozen=True)
class Case:
    """A validated case, ready to mesh and solve; it pickles, so it can go to another process.

    ``model()`` meshes and builds the thermal model; ``run_options`` and ``advisor_options``
    are the keyword arguments of :func:`fem.solve` and :func:`advisor.assess`.

    Attributes
    ----------
    path : Path
        The case file (its name starts every message).
    title : str
        The case's title.
    section, imported : Section or None, SectionMesh or None
        The geometry to mesh, or a mesh read from a file.
    mesh_options : dict
        ``size`` in m and the keyword arguments of :meth:`geometries.Section.mesh`.
    materials : dict of str to Material
        One per region, or ``{"*": material}`` for the whole section.
    boundaries : dict of str to tuple
        The conditions of each edge group.
    initial : float or dict of str to float
        Starting temperature in °C, for the whole section or per region.
    sources, probes : dict
        Heat generated in W/m³ per region (values or schedules); named points (x, y) in m.
    element_order : int
        1 or 2.
    end_time : float
        Duration in s.
    run_options, advisor_options : dict
        Keyword arguments of :func:`fem.solve` and :func:`advisor.assess`.
    outputs : dict of str to bool
        Which optional files to write.
    interfaces : dict of str to fem.Interface
        The contact resistances between regions, by name.
    checkpoint_every : advisor.checkpoint.CheckpointEvery or None
        How often ``soakwise run`` keeps a checkpoint to resume from; None: never.
    """

    path: Path
    title: str
    section: Section | None
    imported: SectionMesh | None
    mesh_options: dict
    materials: dict
    boundaries: dict
    initial: object
    sources: dict
    probes: dict
    element_order: int
    end_time: float
    run_options: dict
    advisor_options: dict
    outputs: dict = field(default_factory=dict)
    interfaces: dict = field(default_factory=dict)
    checkpoint_every: object = None  # advisor.checkpoint.CheckpointEvery, or None for none

    def model(self) -> ThermalModel:
        """Mesh the section (or take the imported mesh) and build the thermal model."""
        if self.imported is not None:
            section_mesh = self.imported
        else:
            options = dict(self.mesh_options)
            section_mesh = self.section.mesh(options.pop("size"), **options)
        material = self.materials.get(WHOLE_SECTION)
        if material is None:
            missing = sorted(set(section_mesh.regions) - set(self.materials))
            if missing:
                raise CaseError(
                    f"{self.path.name}: materials: no material for region(s) {missing}"
                )
            material = {region: self.materials[region] for region in section_mesh.regions}
        return ThermalModel(
            section_mesh,
            material,
            bind_correlations(self.boundaries, section_mesh, self.initial),
            self.initial,
            probes=self.probes,
            element_order=self.element_order,
            heat_sources=self.sources,
            interfaces=self.interfaces,
        )


def load_case(path: str | Path, overrides: dict | None = None) -> Case:
    """Read and check a case file; nothing is meshed or solved.

    ``overrides`` replaces values by dotted key path before checking, e.g.
    ``{"section.mesh_size": "3 mm", "run.end_time": "2 min"}`` (for reduced-size runs).
    """
    path = Path(path)
    if not path.is_file():
        raise CaseError(f"case file {echo(str(path))} does not exist")
    try:
        data = path.read_bytes()
    except OSError as error:
        raise CaseError(f"case file {echo(str(path))} cannot be read: {error.strerror}") from None
    return case_from_toml(decoded(data, path.name), path, overrides)


def decoded(data: bytes, name: str) -> str:
    """The text of a case file, which TOML wants in UTF-8 (a leading byte-order mark is
    dropped); anything else is refused at the first byte that is not UTF-8."""
    try:
        return data.decode("utf-8").removeprefix("\ufeff")
    except UnicodeDecodeError as error:
        start = data[:4]
        looks = (
            " (it looks like UTF-16 or UTF-32: save it as UTF-8)"
            if start[:2] in (b"\xff\xfe", b"\xfe\xff") or b"\x00" in start
            else ""
        )
        raise CaseError(
            f"{name}: not UTF-8 text: byte {error.start} is 0x{data[error.start]:02x}{looks}"
        ) from None


def case_from_toml(
    text: str, path: str | Path = "case.toml", overrides: dict | None = None
) -> Case:
    """A :class:`Case` from the text of a case file; ``path`` names it in messages, and
    relative file paths in it start from its folder."""
    path = Path(path)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise CaseError(f"{path.name}: not valid TOML: {error}") from None
    except RecursionError:  # the parser recurses once per nested array or inline table
        found = nesting_key(text)
        where = path.name + (f", line {found[0]}: {shown_path(found[1])}" if found else "")
        raise CaseError(f"{where}: is nested more than {DEEPEST} tables or arrays deep") from None
    return case_from_data(data, path, overrides, text.splitlines())


def case_from_data(
    data: dict, path: str | Path = "case.toml", overrides: dict | None = None, lines=()
) -> Case:
    """A :class:`Case` from the tables of a case file as a dict (what ``tomllib`` gives);
    ``lines``, the file's text, lets messages name lines."""
    path = Path(path)
    context = Context(path.name, tuple(lines), path.parent)
    check_tree(data, context)  # before any recursive copy or read meets a deep nesting
    data = _overridden(copy.deepcopy(data), overrides or {}, path.name)
    check_tree(data, context)
    try:
        return _read_case(Table(data, "", context), path)
    except LIBRARY_ERRORS as error:  # a library check no key path was found for
        raise CaseError(f"{path.name}: {error}") from None
    except CaseError:
        raise
    except (TypeError, ValueError, KeyError, IndexError, AttributeError, ArithmeticError) as error:
        # a value of a shape no reader expected: refused, never a traceback
        raise CaseError(f"{path.name}: a value could not be read: {echo(error)}") from None


def _overridden(data: dict, overrides: dict, name: str) -> dict:
    """``data`` with ``overrides`` (dotted key path → value) written in."""
    for dotted, value in overrides.items():
        target = data
        *parents, last = str(dotted).split(".")
        for key in parents:
            target = target.setdefault(key, {}) if isinstance(target, dict) else None
        if not isinstance(target, dict):
            raise CaseError(f"{name}: {echo(dotted)}: cannot be set, a key on its path is a value")
        target[last] = value
    return data


def _read_case(root: Table, path: Path) -> Case:
    title = root.text("title", "untitled case")
    section_table = root.table("section")
    plan = read_section(section_table)
    section_table.done()
    materials = read_materials(root, plan.regions)
    interfaces = read_interfaces(root, plan)
    boundaries = read_boundaries(root, plan.groups)
    initial = read_initial(root)
    sources = read_sources(root)
    probes = read_probes(root)
    parts = {"materials": materials, "boundaries": boundaries, "sources": sources}
    end_time, run_options, element_order, checkpoint_every = read_run(
        root, {**parts, "probes": probes}
    )
    check_regions_named(root.context, "sources", sources, plan.regions)
    if isinstance(initial, dict):
        check_regions_named(root.context, "initial.temperature", initial, plan.regions)
    stop = run_options.get("stop")
    check_stop_reachable(root.context, stop, initial, boundaries, sources, end_time)
    advisor_options = read_advisor(root)
    outputs = read_outputs(root)
    root.raw("study", None)  # a study's table, read by advisor.studies
    root.done()
    return Case(
        path=path,
        title=title,
        section=plan.section,
        imported=plan.imported,
        mesh_options=plan.mesh_options,
        materials=materials,
        boundaries=boundaries,
        initial=initial,
        sources=sources,
        probes=probes,
        element_order=element_order,
        end_time=end_time,
        run_options=run_options,
        advisor_options=advisor_options,
        outputs=outputs,
        interfaces=interfaces,
        checkpoint_every=checkpoint_every,
    )
