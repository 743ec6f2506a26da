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
import warnings
from dataclasses import dataclass, field, replace
from pathlib import Path

from fem import ThermalModel, bind_correlations
from geometries import Section, SectionMesh

from .case_checks import check_probes, check_target
from .conditions import read_boundaries, read_initial, read_probes, read_sources
from .interfaces import read_interfaces
from .materials import WHOLE_SECTION, read_materials
from .options import read_advisor, read_outputs, read_run
from .reach import check_regions_named, check_stop_reachable
from .reader import (
    DEEPEST,
    CaseError,
    Context,
    Table,
    check_tree,
    echo,
    line_of,
    nesting_key,
    shown_path,
)
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
    mirrors : tuple of advisor.whole_part.Mirror
        The whole part's mirror lines (``[section] mirror_lines``, then the symmetry cuts).
    declared_mirrors : int
        How many of them ``mirror_lines`` declared; each doubles the copies of the piece.
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
    context: Context | None = field(default=None, compare=False, repr=False)
    raw: dict = field(default_factory=dict, compare=False, repr=False)
    mirrors: tuple = ()
    declared_mirrors: int = 0

    def whole_part(self, section_mesh: SectionMesh) -> tuple:
        """The mirror lines, each turned towards the meshed piece; a line the section
        crosses is refused naming ``section.mirror_lines``."""
        from ..whole_part import oriented

        vertices = section_mesh.vertices
        size = float((vertices.max(axis=1) - vertices.min(axis=1)).max())
        try:
            return oriented(self.mirrors, section_mesh.vertices, 1e-6 * size)
        except ValueError as error:
            raise CaseError(f"{self.path.name}: section.mirror_lines: {error}") from None

    def model(self) -> ThermalModel:
        """Mesh the section (or take the imported mesh) and build the thermal model.

        A probe outside the meshed section and a target the part does not pass through are
        refused here as :class:`CaseError` at their key paths (``probes.<name>``,
        ``advisor.target``), with values in the units the case used.
        """
        if self.imported is not None:
            section_mesh = self.imported
        else:
            options = dict(self.mesh_options)
            section_mesh = self.section.mesh(options.pop("size"), **options)
        if self.declared_mirrors:  # copies the geometry cannot know: a piece drawn by hand
            facts = section_mesh.facts
            copies = facts.symmetry_multiplier * 2**self.declared_mirrors
            section_mesh = replace(section_mesh, facts=replace(facts, symmetry_multiplier=copies))
        material = self.materials.get(WHOLE_SECTION)
        if material is None:
            missing = sorted(set(section_mesh.regions) - set(self.materials))
            if missing:
                message = f"no material for region(s) {missing} of the meshed section"
                if self.context is not None:
                    self.context.fail("materials", message)
                raise CaseError(f"{self.path.name}: materials: {message}")
            material = {region: self.materials[region] for region in section_mesh.regions}
        piece = section_mesh.facts.symmetry_multiplier > 1 or bool(self.mirrors)
        raw_probes = self.raw.get("probes", {})
        check_probes(section_mesh, self.probes, raw_probes, self.context, piece)
        model = ThermalModel(
            section_mesh,
            material,
            bind_correlations(self.boundaries, section_mesh, self.initial),
            self.initial,
            probes=self.probes,
            element_order=self.element_order,
            heat_sources=self.sources,
            interfaces=self.interfaces,
        )
        raw_target = self.raw.get("advisor", {}).get("target")
        check_target(model, self.advisor_options.get("target"), raw_target, self.context)
        return model


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


def _one_element_order(root: Table, mesh_options: dict, element_order: int) -> tuple[dict, int]:
    """One key for the element order: ``[run] element_order``, which also makes the mesh
    follow curved edges (quadratic geometry) when the elements are quadratic.

    ``[section] order``, the older key for the mesh's geometric order, is still accepted but
    deprecated (a :class:`FutureWarning` naming its line): alone, it sets the element order
    too; beside ``[run] element_order`` the latter wins for the elements.
    """
    options = dict(mesh_options)
    section, run = root.data.get("section", {}), root.data.get("run", {})
    if not isinstance(section, dict) or "order" not in section or "file" in section:
        if element_order == 2 and "file" not in section:
            options["order"] = 2
        return options, element_order
    order = int(options.get("order", 1))
    line = line_of(root.context.lines, "section.order")
    where = root.context.name + (f", line {line}" if line else "")
    if isinstance(run, dict) and "element_order" in run:
        curved = " (and a quadratic mesh with them)" if element_order == 2 else ""
        warnings.warn(
            f"{where}: section.order is deprecated: [run] element_order = {element_order} "
            f"sets the elements{curved}; remove section.order",
            FutureWarning,
            stacklevel=2,
        )
        options["order"] = max(order, element_order)
        return options, element_order
    warnings.warn(
        f"{where}: section.order is deprecated: it now sets the element order too; write "
        f"[run] element_order = {order} instead",
        FutureWarning,
        stacklevel=2,
    )
    return options, order


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
    mesh_options, element_order = _one_element_order(root, plan.mesh_options, element_order)
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
        mesh_options=mesh_options,
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
        context=root.context,
        raw={key: root.data[key] for key in ("probes", "advisor") if key in root.data},
        mirrors=plan.mirrors,
        declared_mirrors=plan.declared_mirrors,
        checkpoint_every=checkpoint_every,
    )
