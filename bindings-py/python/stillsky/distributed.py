"""The isolator sweep on a Dask cluster, with the same rows as ``stillsky.sweep`` on one machine.

Needs the optional extra: ``pip install 'stillsky[distributed]'`` (dask[distributed]).

The sweep is split into tasks of (model, a part of the specs, a part of the spectra). A task
carries text only: the model and the specs as TOML text, the spectra as the paths, URLs or
reference names the caller gave (workers read the recordings themselves, so they must reach
those paths or URLs), and the whole sweep's labels. Each task computes its rows with
``stillsky.sweep``'s code; the client puts them in the single-machine order. A task that fails
on the cluster gives error rows (naming its spectra and the reason) for every combination it
held, so no row is lost. See docs/scale-out.md.
"""

from __future__ import annotations

import uuid

try:
    import dask.distributed as _dd
except ImportError as e:  # the extra is optional
    raise ImportError(
        "stillsky.distributed needs dask[distributed]: pip install 'stillsky[distributed]'"
    ) from e

from . import _native
from ._sweep import SweepTable, catalogue_text, model_text, run_part, spectra_list, wind_list

__all__ = ["sweep", "plan_tasks", "study"]


def _task(model, model_name, cat, cat_name, spectra, labels, wind, options):
    """One task's rows (runs on a worker)."""
    try:
        return run_part(model, model_name, cat, cat_name, spectra, labels, wind, options)
    except Exception as e:  # noqa: BLE001 - the client turns this into error rows
        raise RuntimeError(f"task on {', '.join(spectra)} failed: {type(e).__name__}: {e}") from e


def plan_tasks(n_specs: int, n_spectra: int, specs_per_task: int, spectra_per_task: int) -> int:
    """Number of tasks a sweep is split into (the baseline is added to every spec part)."""
    if specs_per_task < 1 or spectra_per_task < 1:
        raise ValueError("specs_per_task and spectra_per_task must be at least 1")
    return max(1, -(-n_specs // specs_per_task)) * -(-n_spectra // spectra_per_task)


def sweep(
    model,
    specs,
    spectra,
    wind=None,
    *,
    client=None,
    specs_per_task: int = 25,
    spectra_per_task: int | None = None,
    threads_per_task: int = 1,
    progress: bool = True,
    f_min_hz: float | None = None,
    f_max_hz: float | None = None,
    n_freq: int | None = None,
    pad_prefix: str | None = None,
    ground_scale=None,
    fs_hz: float | None = None,
) -> SweepTable:
    """``stillsky.sweep`` on a Dask cluster (``client``, default: the current client).

    ``specs_per_task`` × ``spectra_per_task`` combinations (times the wind cases) make a task
    (``spectra_per_task`` None: all spectra, so per-spec work, model, modes and design gusts,
    is done once); each task runs its core sweep on ``threads_per_task`` threads. ``progress`` shows Dask's
    progress bar. Returns the rows of ``stillsky.sweep`` on the same inputs, in the same order.
    """
    sp = spectra_list(spectra)
    if spectra_per_task is None:
        spectra_per_task = max(1, len(sp))
    plan_tasks(1, 1, specs_per_task, spectra_per_task)  # validates the sizes
    client = client if client is not None else _dd.get_client()
    options = dict(
        f_min_hz=f_min_hz, f_max_hz=f_max_hz, n_freq=n_freq, pad_prefix=pad_prefix,
        ground_scale=None if ground_scale is None else [float(v) for v in ground_scale],
        fs_hz=fs_hz, threads=threads_per_task,
    )
    m, mn = model_text(model)
    c, cn = catalogue_text(specs)
    w = wind_list(wind)
    # Checked here, before any task: the same errors as on one machine.
    plan = _native.sweep_plan(m, mn, c, cn, sp, w, **options)  # type: ignore[arg-type]  # options is a dict of mixed keyword values
    labels, winds, spec_names = plan["labels"], plan["winds"], plan["specs"]
    parts = _native.catalogue_parts(c, cn, specs_per_task)
    part_specs = [_native.sweep_plan(m, mn, p, cn, sp[:1], w, **options)["specs"] for p in parts]  # type: ignore[arg-type]
    token = uuid.uuid4().hex[:12]
    tasks = []
    for g0 in range(0, len(sp), spectra_per_task):
        g = list(range(g0, min(g0 + spectra_per_task, len(sp))))
        for k, part in enumerate(parts):
            fut = client.submit(
                _task, m, mn, part, cn, [sp[i] for i in g], [labels[i] for i in g], w, options,
                key=f"stillsky-sweep-{token}-{g0}-{k}", pure=False,
            )
            tasks.append((g, part_specs[k], fut))
    futures = [t[2] for t in tasks]
    try:
        if progress:
            _dd.progress(futures)
        _dd.wait(futures)
        by_key = {}
        for g, names, fut in tasks:
            try:
                rows = fut.result()
            except Exception as e:  # noqa: BLE001 - a failed task becomes error rows
                reason = f"{type(e).__name__}: {e}"
                rows = [
                    _native.sweep_error_row(s, labels[i], wd, f"{sp[i]}: {reason}")
                    for i in g for wd in winds for s in names
                ]
            for r in rows:
                by_key[r["key"]] = r
    finally:
        client.cancel(futures)
    out = SweepTable()
    for i, label in enumerate(labels):
        for wd in winds:
            for s in spec_names:
                key = f"{s}|{label}|{wd}"
                row = by_key.get(key)
                if row is None:
                    row = _native.sweep_error_row(s, label, wd, f"{sp[i]}: no row came back from the cluster")
                out.append(row)
    return out


def _study_task(text, name, folder, which, threads):
    """Rows of some variants of a study (runs on a worker; the study is loaded once per worker)."""
    from ._study import cached_plan

    return cached_plan(text, name, folder).rows(which, threads)


def study(client, study, *, variants_per_task: int = 4, threads_per_task: int = 1, progress: bool = False):
    """``stillsky.study`` on a Dask cluster: the variants are split into tasks of
    ``variants_per_task``; each worker loads the study once (model files, catalogue) and computes
    its variants' rows with the same core code, so the rows are those of ``stillsky.study``, bit
    for bit, in the same order. The study's files and recordings must be readable by the
    workers at the same paths. A task that fails on the cluster gives error rows for its
    variants."""
    from ._study import StudyTable, cached_plan, study_source

    if variants_per_task < 1:
        raise ValueError("variants_per_task must be at least 1")
    text, name, folder = study_source(study)
    plan = cached_plan(text, name, folder)  # checked here: the same errors as on one machine
    labels = plan.variants()
    grounds, winds = plan.disturbances()
    client = client if client is not None else _dd.get_client()
    token = uuid.uuid4().hex[:12]
    parts = [list(range(i, min(i + variants_per_task, len(labels)))) for i in range(0, len(labels), variants_per_task)]
    futures = [
        client.submit(_study_task, text, name, folder, p, threads_per_task, key=f"stillsky-study-{token}-{k}", pure=False)
        for k, p in enumerate(parts)
    ]
    out = StudyTable(plan=plan)
    try:
        if progress:
            _dd.progress(futures)
        for p, fut in zip(parts, futures):
            try:
                out.extend(fut.result())
            except Exception as e:  # noqa: BLE001 - a failed task becomes error rows
                out.extend(_error_rows(plan, [labels[v] for v in p], grounds, winds, f"{type(e).__name__}: {e}"))
    finally:
        client.cancel(futures)
    return out


def _error_rows(plan, variants, grounds, winds, reason):
    cols = plan.columns()
    rows = []
    for v in variants:
        for g in grounds:
            for w in winds:
                r = {c: float("nan") for c in cols}
                r.update(key=f"{v}|{g}|{w}", variant=v, ground=g, wind=w, status="error", vs_base="", error=reason)
                for c in cols[2:-14]:
                    r[c] = ""
                rows.append(r)
    return rows
