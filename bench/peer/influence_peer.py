"""Peer of `plumbline analyze --json` for the speed bench (bench/peer-bench.ts).

A vectorised numpy/scipy (and networkx, when installed, for Louvain) implementation of the same
model version as the TypeScript code, reading the same JSON Lines log and making the same number
of posterior draws. It is what a careful analyst would write in a notebook: whole draws as numpy
arrays, sparse products with scipy.sparse, the eigenvalue with ARPACK. Its random numbers are
numpy's, not plumbline's, so figures agree in distribution (point estimate to the solver
tolerance), not bit for bit.

Model version mirrored: v1 (uniform background b = beta/(n-1), one aggregated Gamma for a row's
unobserved cells, raw decayed counts), as on main at 82219e9. Model v2 (profile prior, Kish
counts, per-cell draws, per-draw streams) landed after this script was written: until the steps
below are updated, the bench's agreement row reports the difference and the ratio compares
different models.

Each step names the TypeScript function it mirrors, so a model change is a local edit here:

  read_ledger            src/attention/read-event-log.ts + channel-ledger.ts (rules 1-6)
  collect_signals        src/attention/collect-signals.ts           (DESIGN.md §4 steps 1-2)
  count_matrix           src/attention/build-attention-input.ts     countMatrixFromSignals (step 3)
  closed_groups          src/attention/closed-groups.ts             (step 8)
  louvain                src/attention/louvain-clusters.ts          (step 9)
  point_rows             src/influence/attention-rows.ts            pointAttentionRows (step 4)
  left_multiply          src/influence/attention-rows.ts            leftMultiply
  stationary             src/influence/stationary-vector.ts         (step 5)
  draw_rows              src/influence/posterior-draws.ts           drawInto (step 6)
  second_eigenvalue      src/influence/second-eigenvalue.ts         (step 8)
  assemble               src/analysis/assemble-report.ts            (step 7, intervals)

Usage: python3 influence_peer.py LOG.jsonl [--samples K] [--seed S] [--draw-tolerance T]
Prints the report as JSON on stdout and the wall time per step on stderr.
"""

import argparse
import json
import resource
import sys
import time
from datetime import datetime

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components
from scipy.sparse.linalg import LinearOperator, eigs

DAY_MS = 86_400_000
SETTINGS = dict(
    windowDays=28, halfLifeDays=14, replyWeight=1.0, mentionWeight=1.0, background=1.0,
    selfWeight=0.5, samples=400, interval=0.9, confidence=0.8, minMembers=5, minSignals=20,
)
CONSENTING = ("counted", "named")


def epoch_ms(text):
    return round(datetime.fromisoformat(text.replace("Z", "+00:00")).timestamp() * 1000)


class Timeline:
    """Latest value at or before a time, per member (consent levels, group labels)."""

    def __init__(self):
        self.changes = {}

    def add(self, member, at, value):
        self.changes.setdefault(member, []).append((at, value))

    def at(self, member, when, default):
        value = default
        for at, v in self.changes.get(member, ()):
            if at <= when:
                value = v
        return value


def read_ledger(path):
    """One channel's messages after consent, edit, delete and group rules (arrival order)."""
    consent, groups, messages, last = Timeline(), Timeline(), {}, None
    ok = lambda member, at: consent.at(member, at, "off") in CONSENTING
    channel = None
    with open(path, encoding="utf-8") as f:
        for raw in f:
            if not raw.strip():
                continue
            e = json.loads(raw)
            at = epoch_ms(e["at"])
            channel = channel or e["channel"]
            last = at if last is None or at > last else last
            kind = e["type"]
            if kind == "consent":
                consent.add(e["member"], at, e["level"])
            elif kind == "group":
                groups.add(e["member"], at, e.get("group"))
            elif kind == "message":
                if e["id"] in messages or not ok(e["author"], at):
                    continue
                parent = e.get("parentAuthor")
                if parent is None and "parent" in e and e["parent"] in messages:
                    parent = messages[e["parent"]]["author"]
                if parent is not None and (parent == e["author"] or not ok(parent, at)):
                    parent = None
                mentions = sorted({m for m in e.get("mentions", ()) if m != e["author"] and ok(m, at)})
                messages[e["id"]] = dict(author=e["author"], at=at, parent=parent,
                                         mentions=mentions, deleted=False)
            elif kind == "edit" and e["id"] in messages:
                m = messages[e["id"]]
                m["mentions"] = sorted({x for x in e["mentions"] if x != m["author"] and ok(x, m["at"])})
            elif kind in ("delete", "undelete") and e["id"] in messages:
                messages[e["id"]]["deleted"] = kind == "delete"
    ordered = sorted(messages.items(), key=lambda kv: (kv[1]["at"], kv[0]))
    return dict(channel=channel, messages=[m for _, m in ordered], consent=consent,
                groups=groups, last=last)


def collect_signals(ledger, until, s):
    start = until - s["windowDays"] * DAY_MS
    half = s["halfLifeDays"] * DAY_MS
    cache = {}

    def consenting(member):
        if member not in cache:
            cache[member] = ledger["consent"].at(member, until, "off") in CONSENTING
        return cache[member]

    src, dst, ages = [], [], []
    active = set()
    for m in ledger["messages"]:
        if m["deleted"] or m["at"] <= start or m["at"] > until or not consenting(m["author"]):
            continue
        active.add(m["author"])
        targets = []
        if s["replyWeight"] > 0 and m["parent"] is not None and consenting(m["parent"]):
            targets.append((m["parent"], s["replyWeight"]))
        if s["mentionWeight"] > 0:
            targets += [(x, s["mentionWeight"]) for x in m["mentions"] if consenting(x)]
        for to, base in targets:
            src.append(m["author"])
            dst.append(to)
            ages.append((until - m["at"], base))
            active.add(to)
    members = sorted(active)
    age = np.array([a for a, _ in ages], dtype=float)
    base = np.array([b for _, b in ages], dtype=float)
    weight = base if half == 0 else base * 0.5 ** (age / half)
    return members, src, dst, weight


def count_matrix(members, src, dst, weight):
    index = {m: i for i, m in enumerate(members)}
    i = np.fromiter((index[x] for x in src), dtype=np.int64, count=len(src))
    j = np.fromiter((index[x] for x in dst), dtype=np.int64, count=len(dst))
    n = len(members)
    c = sp.csr_matrix((weight, (i, j)), shape=(n, n))
    c.sum_duplicates()
    c.setdiag(0)
    c.eliminate_zeros()
    c.sort_indices()
    return c


def closed_groups(c):
    n = c.shape[0]
    count, label = connected_components(c, directed=True, connection="strong")
    silent = np.diff(c.indptr) == 0
    coo = c.tocoo()
    leaves = np.zeros(count, dtype=bool)
    leaves[label[coo.row][label[coo.row] != label[coo.col]]] = True
    has_silent = np.zeros(count, dtype=bool)
    has_silent[label[silent]] = True
    closed = [np.flatnonzero(label == k) for k in range(count) if not leaves[k] and not has_silent[k]]
    if silent.any() and not closed:
        return [np.arange(n)]
    return sorted(closed, key=lambda g: g[0])


def louvain(c, seed):
    try:
        import networkx as nx
    except ImportError:
        return None
    sym = sp.triu(c + c.T, k=1).tocoo()
    if sym.nnz == 0:
        return None
    graph = nx.Graph()
    graph.add_nodes_from(range(c.shape[0]))
    graph.add_weighted_edges_from(zip(sym.row.tolist(), sym.col.tolist(), sym.data.tolist()))
    parts = nx.community.louvain_communities(graph, weight="weight", seed=seed % (2**32))
    groups = sorted((sorted(p) for p in parts), key=lambda g: g[0])
    return dict(groups=groups, modularity=nx.community.modularity(graph, parts, weight="weight"))


def point_rows(c, beta):
    n = c.shape[0]
    totals = np.asarray(c.sum(axis=1)).ravel()
    empty = totals <= 0
    denom = np.where(empty, 1.0, totals + beta)
    values = c.multiply(1.0 / denom[:, None]).tocsr()
    rest = np.where(empty, 1.0 / (n - 1), beta / (n - 1) / denom)
    return values, rest


def left_multiply(values_t, rest, x):
    """x·A with A_ij = values_ij + rest_i (j != i): the rank-one rest is never stored."""
    return values_t @ x + (x @ rest - x * rest)


def stationary(values, rest, tolerance, start=None, max_iterations=100_000):
    n = values.shape[0]
    values_t = values.T.tocsr()
    x = np.full(n, 1.0 / n) if start is None else start / start.sum()
    sigma = 0.0 if n > 2 else 0.5
    previous = np.inf
    for iteration in range(1, max_iterations + 1):
        y = sigma * x + (1 - sigma) * left_multiply(values_t, rest, x)
        y /= y.sum()
        change = np.abs(y - x).sum()
        x = y
        if change < tolerance:
            x = np.maximum(x, 0)
            return x / x.sum(), iteration
        if sigma == 0 and iteration > 4 and change > 0.75 * previous:
            sigma = 0.5
        previous = change
    raise RuntimeError("no convergence")


def draw_rows(c, beta, rng, row_of, unobserved):
    """One draw: every stored cell a Gamma(C_ij + b) variate, each row's unobserved cells one
    Gamma(b * unobserved) variate spread evenly, rows normalised; a whole draw in one numpy call."""
    n = c.shape[0]
    b = beta / (n - 1)
    g = rng.standard_gamma(c.data + b)
    rest_shape = b * unobserved
    g_rest = np.where(rest_shape > 0, rng.standard_gamma(np.maximum(rest_shape, 1e-300)), 0.0)
    total = np.bincount(row_of, weights=g, minlength=n) + g_rest
    observed = np.diff(c.indptr) > 0
    safe = np.where(total > 0, total, 1.0)
    spread = np.where(unobserved > 0, g_rest / safe / np.maximum(unobserved, 1), 0.0)
    values = sp.csr_matrix((g / safe[row_of] - spread[row_of], c.indices, c.indptr), shape=c.shape)
    rest = np.where(observed, spread, 1.0 / (n - 1))
    return values, rest


def second_eigenvalue(values, rest, sigma, s):
    n = values.shape[0]
    if n <= 150:
        a = values.toarray() + rest[:, None]
        np.fill_diagonal(a, values.diagonal())
        t = sigma * np.eye(n) + (1 - sigma) * a
        return min(1.0, float(np.sort(np.abs(np.linalg.eigvals(t)))[::-1][1]))
    values_t = values.T.tocsr()

    def product(x):  # x(T - 1s) as a column operator on x's transpose
        x = np.asarray(x).ravel()
        return sigma * x + (1 - sigma) * left_multiply(values_t, rest, x) - x.sum() * s

    op = LinearOperator((n, n), matvec=product, dtype=float)
    return float(np.abs(eigs(op, k=1, which="LM", tol=1e-7, return_eigenvectors=False))[0])


def r6(x):
    return round(float(x), 6) + 0.0


def interval(sample, mass):
    lo, hi = np.quantile(sample, [(1 - mass) / 2, (1 + mass) / 2], axis=-1)  # Hyndman & Fan 7
    return lo, hi


def assemble(members, values, rest, shares, draws, voices_draws, lam2, groups_closed, clusters, s):
    n = len(members)
    threshold = max(0.30, 2 / n)
    lo, hi = interval(draws.T, s["interval"])
    p_above = (draws >= threshold).mean(axis=0)
    received = left_multiply(values.T.tocsr(), rest, np.ones(n))
    order = sorted(range(n), key=lambda i: (-r6(shares[i]), members[i]))
    voices = 1 / np.square(shares).sum()
    vlo, vhi = interval(voices_draws, s["interval"])
    top = order[0]
    col = values[:, [top]].toarray().ravel() + rest
    col[top] = 0
    parts = shares * col / shares[top]
    entries = [dict(member=members[i], share=r6(shares[i]), low=r6(lo[i]), high=r6(hi[i]),
                    pAbove=r6(p_above[i]), attentionReceived=r6(received[i])) for i in order]
    cluster_figures = None
    if clusters is not None:
        cluster_figures = []
        for k, g in enumerate(clusters["groups"]):
            glo, ghi = interval(draws[:, g].sum(axis=1), s["interval"])
            cluster_figures.append(dict(group=f"cluster {k + 1}", members=len(g),
                                        share=r6(shares[g].sum()), low=r6(glo), high=r6(ghi)))
    return dict(
        members=n, status="ok", influence=entries, top=entries[0],
        effectiveVoices=dict(value=r6(voices), low=r6(vlo), high=r6(vhi)),
        balance=r6(voices / n), hhi=round(10000 / voices) if n >= 7 else None,
        consensus=dict(closedGroups=len(groups_closed), secondEigenvalue=r6(lam2)),
        contributors=sorted(({"member": members[i], "share": r6(parts[i])} for i in order if i != top),
                            key=lambda c: (-c["share"], c["member"])),
        clusters=None if clusters is None else dict(modularity=r6(clusters["modularity"]),
                                                      groups=cluster_figures),
    )


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("log")
    parser.add_argument("--samples", type=int, default=SETTINGS["samples"])
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--draw-tolerance", type=float, default=1e-9)
    args = parser.parse_args()
    s = dict(SETTINGS, samples=args.samples)
    laps, last = {}, time.perf_counter()

    def lap(name):
        nonlocal last
        now = time.perf_counter()
        laps[name] = round(now - last, 3)
        last = now

    ledger = read_ledger(args.log)
    lap("read")
    until = ledger["last"]
    members, src, dst, weight = collect_signals(ledger, until, s)
    c = count_matrix(members, src, dst, weight)
    lap("signals+counts")
    groups_closed = closed_groups(c)
    labels = [ledger["groups"].at(m, until, None) for m in members]
    clusters = louvain(c, args.seed) if all(x is None for x in labels) else None
    lap("structure")
    n, beta, sigma = len(members), s["background"], s["selfWeight"]
    values, rest = point_rows(c, beta)
    shares, _ = stationary(values, rest, 1e-12)
    lap("point")
    rng = np.random.default_rng(args.seed)
    row_of = np.repeat(np.arange(n), np.diff(c.indptr))
    unobserved = (n - 1 - np.diff(c.indptr)).astype(float)
    draws = np.empty((s["samples"], n))
    for k in range(s["samples"]):
        dv, dr = draw_rows(c, beta, rng, row_of, unobserved)
        draws[k], _ = stationary(dv, dr, args.draw_tolerance, start=shares)
    voices_draws = 1 / np.square(draws).sum(axis=1)
    lap("draws")
    lam2 = second_eigenvalue(values, rest, sigma, shares)
    lap("lambda2")
    report = assemble(members, values, rest, shares, draws, voices_draws, lam2, groups_closed,
                      clusters, s)
    report["signals"] = len(src)
    lap("assemble")
    json.dump(report, sys.stdout, indent=2)
    sys.stdout.write("\n")
    print(json.dumps({"peerSteps": laps}), file=sys.stderr)
    usage = resource.getrusage(resource.RUSAGE_SELF)
    print(f"maxrss {usage.ru_maxrss}", file=sys.stderr)
    print(f"cpu {round((usage.ru_utime + usage.ru_stime) * 1000)}", file=sys.stderr)


if __name__ == "__main__":
    main()
