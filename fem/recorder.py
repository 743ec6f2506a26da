"""Collects the per-step histories and the output fields of a run."""

from __future__ import annotations

import numpy as np

from .system import ConductionSystem


class HistoryRecorder:
    """Records mean, extremes, probes, edge heat flows and energy after every step."""

    def __init__(self, system: ConductionSystem, dof_locations: np.ndarray, probe_names):
        self._system = system
        self._locations = dof_locations  # (2, n_dofs)
        self._probe_names = list(probe_names)
        self._rows: list[tuple] = []
        self._fields: list[np.ndarray] = []
        self._output_times: list[float] = []
        self._initial: np.ndarray | None = None
        self.absorbed_heat = 0.0

    def heat_flow_total(self, temperature: np.ndarray) -> float:
        """Heat flow into the part through all edges in W/m."""
        return sum(e.heat_flow(temperature) for e in self._system.exchange.values())

    def record(self, time: float, temperature: np.ndarray) -> None:
        if self._initial is None:
            self._initial = temperature.copy()
        low, high = int(np.argmin(temperature)), int(np.argmax(temperature))
        change = temperature - self._initial
        stored = float(np.ones(self._system.size) @ (self._system.capacity @ change))
        self._rows.append(
            (
                time,
                float(self._system.volume_weights @ temperature),
                temperature[low],
                temperature[high],
                self._locations[:, low],
                self._locations[:, high],
                self._system.probe_matrix @ temperature,
                [e.heat_flow(temperature) for e in self._system.exchange.values()],
                stored,
                self.absorbed_heat,
            )
        )

    def store_field(self, time: float, temperature: np.ndarray) -> None:
        self._output_times.append(time)
        self._fields.append(temperature[self._system.vertex_dofs].copy())

    def histories(self) -> dict[str, object]:
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
            heat_flow={n: flows[:, i] for i, n in enumerate(self._system.exchange)},
            stored_energy=np.array(columns[8]),
            absorbed_heat=np.array(columns[9]),
            output_times=np.array(self._output_times),
            fields=np.array(self._fields),
        )
