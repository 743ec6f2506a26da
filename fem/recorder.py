"""Collects the per-step histories and the output fields of a run."""

from __future__ import annotations

import numpy as np

from .errors import ModelError
from .fields import FieldSeries
from .system import ConductionSystem, inner


class HistoryRecorder:
    """Records mean, extremes, probes, edge heat flows and energy after every step."""

    def __init__(
        self,
        system: ConductionSystem,
        dof_locations: np.ndarray,
        fields: FieldSeries,
        initial_stored: float,
    ):
        self._system = system
        self._locations = dof_locations  # (2, n_dofs)
        self._probe_names = list(system.model.probes)
        self._flow_names = sorted(set(system.edges) | set(system.fixed_dofs))
        self._rows: list[tuple] = []
        self._fields = fields
        self._output_times: list[float] = []
        self._initial_stored = initial_stored
        self._interfaces: list[dict[str, tuple[float, float]]] = []  # per record, if any
        # (largest internal difference, its time, the field then): a fast event may fall
        # between output times, and pictures of the run must still show its peak
        self._peak: tuple[float, float, np.ndarray | None] = (-1.0, 0.0, None)

    def record(
        self,
        time: float,
        temperature: np.ndarray,
        stored: float,
        absorbed: float,
        reactions: dict[str, float],
    ) -> None:
        """Add one state; ``stored`` is 1ᵀC(T) (J), ``reactions`` the fixed groups' flows."""
        flows = self._system.edge_heat_flows(temperature, time)
        flows.update(reactions)
        if self._system.interfaces:
            self._interfaces.append(self._system.interface_states(temperature))
        self._append(
            time,
            inner(self._system.volume_weights, temperature),
            temperature,
            self._system.probe_matrix @ temperature,
            flows,
            stored,
            absorbed,
        )

    def record_many(
        self,
        times: np.ndarray,
        temperatures: np.ndarray,
        stored: np.ndarray,
        absorbed: np.ndarray,
        reactions: dict[str, np.ndarray],
    ) -> None:
        """Add several states at once, ``temperatures`` one per row (linear models: the
        edge flows are linear in the field, so the whole batch takes one product each)."""
        s = self._system
        means = temperatures @ s.volume_weights  # BLAS: a batch is worth its threads
        probes = (s.probe_matrix @ temperatures.T).T
        flows = {name: np.zeros(len(times)) for name in self._flow_names}
        flows.update(s.edge_heat_flows_many(times, temperatures))
        for name, values in reactions.items():
            flows[name] = np.asarray(values, dtype=float)
        for i, time in enumerate(times):
            if s.interfaces:
                self._interfaces.append(s.interface_states(temperatures[i]))
            self._append(
                float(time),
                float(means[i]),
                temperatures[i],
                probes[i],
                {name: float(v[i]) for name, v in flows.items()},
                float(stored[i]),
                float(absorbed[i]),
            )

    def _append(self, time, mean, temperature, probes, flows, stored, absorbed) -> None:
        low, high = int(np.argmin(temperature)), int(np.argmax(temperature))
        spread = float(temperature[high] - temperature[low])
        if spread > self._peak[0]:
            self._peak = (spread, time, temperature[self._system.vertex_dofs])  # a gather: a copy
        self._rows.append(
            (
                time,
                mean,
                temperature[low],
                temperature[high],
                self._locations[:, low],
                self._locations[:, high],
                probes,
                [flows.get(n, 0.0) for n in self._flow_names],
                self._system.generated(time),
                stored - self._initial_stored,
                absorbed,
            )
        )

    def store_field(self, time: float, temperature: np.ndarray) -> None:
        """Keep the field at an output time (its vertex values)."""
        self._output_times.append(time)
        self._fields.append(temperature[self._system.vertex_dofs])

    def state(self) -> dict:
        """Everything recorded so far, as arrays (for a checkpoint; see :meth:`restore`)."""
        n = len(self._rows)
        columns = list(zip(*self._rows, strict=True)) if n else [()] * 11
        return {
            "scalars": np.array([columns[k] for k in (0, 1, 2, 3, 8, 9, 10)], dtype=float),
            "locations": np.array([columns[4], columns[5]], dtype=float).reshape(2, n, 2),
            "probes": np.array(columns[6], dtype=float).reshape(n, len(self._probe_names)),
            "flows": np.array(columns[7], dtype=float).reshape(n, len(self._flow_names)),
            "initial_stored": self._initial_stored,
            "output_times": np.array(self._output_times, dtype=float),
            "fields": np.array([np.asarray(f) for f in self._fields], dtype=float),
            "interfaces": {
                name: np.array([row[name] for row in self._interfaces], dtype=float)
                for name in self._system.interfaces
            },
            "peak": np.array(self._peak[:2], dtype=float),
            "peak_field": np.asarray(self._peak[2], dtype=float),
        }

    def restore(self, state: dict) -> None:
        """Replace what was recorded by a :meth:`state` of the same system."""
        flows, probes = np.asarray(state["flows"]), np.asarray(state["probes"])
        if flows.shape[1:] != (len(self._flow_names),) or probes.shape[1:] != (
            len(self._probe_names),
        ):
            raise ModelError(
                f"the state to resume records {flows.shape[1]} heat flows and "
                f"{probes.shape[1]} probes; this model has {len(self._flow_names)} and "
                f"{len(self._probe_names)}",
                argument="resume",
            )
        time, mean, low, high, generated, stored, absorbed = np.asarray(state["scalars"])
        where_low, where_high = np.asarray(state["locations"])
        self._initial_stored = float(state["initial_stored"])
        self._rows = [
            (
                float(time[i]),
                float(mean[i]),
                float(low[i]),
                float(high[i]),
                where_low[i],
                where_high[i],
                probes[i],
                list(flows[i]),
                float(generated[i]),
                float(stored[i]),
                float(absorbed[i]),
            )
            for i in range(len(time))
        ]
        interfaces = state.get("interfaces") or {}
        self._interfaces = [
            {name: tuple(float(v) for v in values[i]) for name, values in interfaces.items()}
            for i in range(len(time) if interfaces else 0)
        ]
        if "peak" in state:
            spread, when = (float(v) for v in np.asarray(state["peak"]))
            self._peak = (spread, when, np.asarray(state["peak_field"], dtype=float))
        # The fields kept so far (the initial one) are the state's first ones: add the rest.
        self._output_times = [float(t) for t in state["output_times"]]
        for field in np.asarray(state["fields"])[len(self._fields) :]:
            self._fields.append(field)

    def _interface_column(self, name: str, index: int) -> np.ndarray:
        """The jump (0) or heat flow (1) of one interface at every record."""
        return np.array([row[name][index] for row in self._interfaces])

    def histories(self) -> dict[str, object]:
        """Every recorded quantity as arrays over the records (the fields of a Solution)."""
        columns = list(zip(*self._rows, strict=True))
        probes = np.array(columns[6]).reshape(len(self._rows), -1)
        flows = np.array(columns[7]).reshape(len(self._rows), -1)
        return dict(
            times=np.array(columns[0]),
            mean=np.array(columns[1]),
            minimum=np.array(columns[2]),
            maximum=np.array(columns[3]),
            minimum_location=np.array(columns[4]),
            maximum_location=np.array(columns[5]),
            probes={n: probes[:, i] for i, n in enumerate(self._probe_names)},
            heat_flow={n: flows[:, i] for i, n in enumerate(self._flow_names)},
            generated=np.array(columns[8]),
            stored_energy=np.array(columns[9]),
            absorbed_heat=np.array(columns[10]),
            output_times=np.array(self._output_times),
            fields=self._fields,
            interface_jump={n: self._interface_column(n, 0) for n in self._system.interfaces},
            interface_heat_flow={n: self._interface_column(n, 1) for n in self._system.interfaces},
            peak_field=self._peak[2],
            peak_field_time=self._peak[1] if self._peak[2] is not None else None,
        )
