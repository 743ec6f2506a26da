"""The two ways an analyst would solve the same semi-discrete system M T' = b − A T without
soakwise, on the very matrices soakwise assembles (``fem.assemble(model)``).

(a) ``script``: Crank–Nicolson written out by hand, (M + Δt/2·A) T₁ = (M − Δt/2·A) T₀ + Δt·b,
    with ``scipy.sparse.linalg.spsolve`` every step. spsolve factorises the matrix again on
    every call (SuperLU, its default COLAMD ordering). Both matrices are formed once, before
    the loop, which is kinder to the script than writing them inside it.
(b) ``ivp``: ``scipy.integrate.solve_ivp(method="BDF")`` on T' = D⁻¹(b − A T) with the
    *row-sum lumped* capacity D = diag(M·1) (solve_ivp has no mass matrix, and a factorised
    consistent M would make the Jacobian −M⁻¹A dense), given the constant sparse Jacobian
    −D⁻¹A so BDF needs no finite differences. Lumping changes the spatial discretisation
    slightly; its error against the exact solution is measured like every other.
"""

from __future__ import annotations

import time

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.integrate import solve_ivp


def system_matrices(model):
    """M, A and b from soakwise's own assembly (all degrees of freedom free: no fixed edges)."""
    from fem import assemble

    system = assemble(model)
    if system.free_dofs.size != system.size:
        raise ValueError("the baselines handle models without fixed temperatures only")
    return system, system.capacity.tocsr(), system.exchange_operator(0.0), system.load(0.0)


def script_steps(model, time_step: float, steps: int) -> dict:
    """Run (a) for ``steps`` steps from the initial state; time each step."""
    from fem.assembly import initial_field

    started = time.perf_counter()
    system, M, A, b = system_matrices(model)
    left = (M + 0.5 * time_step * A).tocsc()
    right = (M - 0.5 * time_step * A).tocsr()
    load = time_step * b
    temperature = initial_field(system)
    prepared = time.perf_counter()
    step_times = []
    for _ in range(steps):
        t0 = time.perf_counter()
        temperature = spla.spsolve(left, right @ temperature + load)
        step_times.append(time.perf_counter() - t0)
    return {
        "steps": steps,
        "factorisations": steps,
        "setup_seconds": prepared - started,
        "step_seconds": step_times,
        "per_step_seconds": float(np.median(step_times)),
        "total_seconds": time.perf_counter() - started,
        "final_mean": float(system.volume_weights @ temperature),
    }


def ivp_bdf(model, end_time: float, output_times, rtol: float, atol: float) -> dict:
    """Run (b) to ``end_time``; fields at ``output_times`` (vertex values)."""
    from fem.assembly import initial_field

    started = time.perf_counter()
    system, M, A, b = system_matrices(model)
    lumped = np.asarray(M.sum(axis=1)).ravel()
    inverse = 1.0 / lumped
    jacobian = sp.csc_matrix(-(sp.diags(inverse) @ A))
    accepted = [0]

    def rate(t, temperature):
        return inverse * (b - A @ temperature)

    def count_steps(t, temperature):  # solve_ivp calls each event once per accepted step
        accepted[0] += 1
        return 1.0

    prepared = time.perf_counter()
    result = solve_ivp(
        rate,
        (0.0, end_time),
        initial_field(system),
        method="BDF",
        t_eval=np.asarray(output_times),
        rtol=rtol,
        atol=atol,
        jac=jacobian,
        events=count_steps,
    )
    finished = time.perf_counter()
    if not result.success:
        raise RuntimeError(f"solve_ivp failed: {result.message}")
    steps = accepted[0] - 1  # one call at the start
    return {
        "steps": steps,
        "factorisations": int(result.nlu),
        "function_evaluations": int(result.nfev),
        "setup_seconds": prepared - started,
        "solve_seconds": finished - prepared,
        "per_step_seconds": (finished - prepared) / max(steps, 1),
        "total_seconds": finished - started,
        "times": result.t.tolist(),
        "fields": [result.y[system.vertex_dofs, k] for k in range(result.y.shape[1])],
    }
