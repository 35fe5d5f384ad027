"""Peer of `plumbline analyze --json` for the speed bench (bench/peer-bench.ts).

A vectorised numpy/scipy (and networkx, when installed, for Louvain) implementation of the same
model version as the TypeScript code, reading the same JSON Lines log and making the same number
of posterior draws. It is what a careful analyst would write in a notebook: whole draws as numpy
arrays, sparse products with scipy.sparse, the eigenvalue with ARPACK. Its random numbers are
numpy's, not plumbline's, so figures agree in distribution (point estimate to the solver
tolerance), not bit for bit.

Model version mirrored: v2 (DESIGN.md §4 version 2; DEVELOPERS.md "Model version 2", "Learnt
popularity hyperprior", "Every cell drawn, and pooled above 64 members"), as on main at 06762e1:
Kish effective counts, the profile's learnt popularity hyperprior with hub columns, a per-row
strength posterior on a 25-point grid (two passes), and draws that take the profile, each row's
strength and every cell (per cell up to 64 members; above, sticks or the group's pooled
direction). The prior's groups come from networkx's Louvain, not graphology's: where the
modularity reaches 0.3 the two may pick different partitions, and then the point shares differ
(the bench's synthetic channels have one group). The sticks are drawn with the same law by a
different route (running sums of exponentials, vectorised).

Each step names the TypeScript function it mirrors, so a model change is a local edit here:

  read_ledger            src/attention/read-event-log.ts + channel-ledger.ts (rules 1-6)
  collect_signals        src/attention/collect-signals.ts           (DESIGN.md §4 steps 1-2)
  count_matrix           src/attention/build-attention-input.ts     countMatrixFromSignals (step 3)
  closed_groups          src/attention/closed-groups.ts             (step 8)
  louvain                src/attention/louvain-clusters.ts          (step 9)
  prior_groups           src/attention/build-attention-input.ts     priorGroupsOf
  fit_popularity         src/influence/attention-prior.ts           fitPopularity
  profile_posterior      src/influence/attention-prior.ts           profilePosterior
  build_prior            src/influence/attention-prior.ts           buildAttentionPrior (step 4)
  point_rows             src/influence/attention-prior.ts           pointRowsFromPrior
  Rows.left_multiply     src/influence/attention-rows.ts            leftMultiply
  stationary             src/influence/stationary-vector.ts         (step 5)
  draw_rows              src/influence/posterior-draws.ts           drawMatrixInto (step 6)
  pooled_direction       src/influence/posterior-draws.ts           drawPooled
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
from scipy.special import gammaln
from scipy.sparse.csgraph import connected_components
from scipy.sparse.linalg import LinearOperator, eigs

DAY_MS = 86_400_000
SETTINGS = dict(
    windowDays=28, halfLifeDays=14, replyWeight=1.0, mentionWeight=1.0, background=1.0,
    selfWeight=0.5, samples=400, interval=0.9, confidence=0.8, minMembers=5, minSignals=20,
)
CONSENTING = ("counted", "named")
BROADCAST_MENTIONS = 50


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


def mention_targets(mentions, author, at, ok):
    """Consenting members mentioned, the author left out; none for a broadcast (more than
    BROADCAST_MENTIONS distinct members mentioned: only its reply signal counts)."""
    distinct = {m for m in mentions if m != author}
    if len(distinct) > BROADCAST_MENTIONS:
        return []
    return sorted(m for m in distinct if ok(m, at))


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
                mentions = mention_targets(e.get("mentions", ()), e["author"], at, ok)
                messages[e["id"]] = dict(author=e["author"], at=at, parent=parent,
                                         mentions=mentions, deleted=False)
            elif kind == "edit" and e["id"] in messages:
                m = messages[e["id"]]
                m["mentions"] = mention_targets(e["mentions"], m["author"], m["at"], ok)
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
    """C in CSR and each row's Kish factor k_i = sum w / sum w^2 (1 for a row without signals)."""
    index = {m: i for i, m in enumerate(members)}
    i = np.fromiter((index[x] for x in src), dtype=np.int64, count=len(src))
    j = np.fromiter((index[x] for x in dst), dtype=np.int64, count=len(dst))
    n = len(members)
    keep = i != j
    i, j, weight = i[keep], j[keep], weight[keep]
    c = sp.csr_matrix((weight, (i, j)), shape=(n, n))
    c.sum_duplicates()
    c.eliminate_zeros()
    c.sort_indices()
    sums = np.bincount(i, weights=weight, minlength=n)
    squares = np.bincount(i, weights=weight * weight, minlength=n)
    kish = np.where(squares > 0, sums / np.where(squares > 0, squares, 1.0), 1.0)
    return c, kish


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


PRIOR = dict(
    popularity_grid=(0.01, 1000.0, 61), hub_share=0.05, hub_range=1000.0, hub_nodes=48,
    strength_grid_points=25, strength_grid_low=0.1, passes=2, group_modularity=0.3, group_seed=1,
)
EXACT_MEMBERS = 64
STICK_REMAINDER = 1e-6
POOL_HEAVY = 0.02


def log_grid(low, high, points):
    a, b = np.log(low), np.log(high)
    return np.exp(a + (b - a) * np.arange(points) / (points - 1))


def prior_groups(c):
    """Louvain clusters of C + C^T (seed 1) when their modularity is >= 0.3, else one group."""
    clusters = louvain(c, PRIOR["group_seed"])
    out = np.zeros(c.shape[0], dtype=np.int64)
    if clusters is None or not clusters["modularity"] >= PRIOR["group_modularity"]:
        return out
    for g, members in enumerate(clusters["groups"]):
        out[members] = g
    return out


def log_negative_binomial(x, r, mean):
    """log P(x) of the Gamma-Poisson marginal with shape r and mean mu (broadcasts)."""
    log_total = np.log(r + mean)
    tail = np.where(x > 0, x * (np.log(mean) - log_total), 0.0)
    return gammaln(x + r) - gammaln(r) - gammaln(x + 1) + r * (np.log(r) - log_total) + tail


def log_hub_marginal(x, mean):
    """log P(x) when the rate is log-uniform on [mu, R mu]: trapezoid rule on 48 nodes in ln rate."""
    nodes, rng_ = PRIOR["hub_nodes"], PRIOR["hub_range"]
    h = np.log(rng_) / (nodes - 1)
    log_rate = np.log(mean) + h * np.arange(nodes)
    w = np.ones(nodes)
    w[0] = w[-1] = 0.5
    logs = x[:, None] * log_rate[None, :] - np.exp(log_rate)[None, :] - gammaln(x + 1)[:, None] + np.log(w)
    top = logs.max(axis=1)
    return top + np.log(np.exp(logs - top[:, None]).sum(axis=1) / (nodes - 1))


def fit_popularity(x):
    """attention-prior.ts fitPopularity: EM over (typical Gamma(beta) with mean mu, hub) members."""
    n = len(x)
    low, high, points = PRIOR["popularity_grid"]
    hub = np.zeros(n)
    total = x.sum()
    if not total > 0 or n == 0:
        return high, 1.0, hub
    grid = log_grid(low, high, points)
    mean, shape = total / n, 1.0
    positive = x > 0
    hs = PRIOR["hub_share"]
    for _ in range(20):
        hub = np.zeros(n)
        xp = x[positive]
        hub_log = np.log(hs) + log_hub_marginal(xp, mean)
        typical = np.log(1 - hs) + log_negative_binomial(xp, shape, mean)
        hub[positive] = 1 / (1 + np.exp(typical - hub_log))
        weight = (1 - hub).sum()
        s = ((1 - hub) * x).sum()
        next_mean = s / weight if weight > 0 and s > 0 else mean
        logs = ((1 - hub)[None, :] * log_negative_binomial(x[None, :], grid[:, None], next_mean)).sum(axis=1)
        next_shape = grid[int(np.argmax(logs))]
        settled = next_shape == shape and abs(next_mean - mean) <= 1e-9 * mean
        shape, mean = next_shape, next_mean
        if settled:
            break
    return shape, mean, hub


def log_dirichlet_multinomial(x, a):
    cells = np.where(x > 0, gammaln(x + a) - gammaln(a), 0.0)
    return gammaln(a.sum()) - gammaln(x.sum() + a.sum()) + cells.sum()


def profile_posterior(own, channel, groups):
    """attention-prior.ts profilePosterior: Gamma shapes (groups x n), means, hubs (one group)."""
    n = len(channel)
    shape, mean, hub = fit_popularity(channel)
    rate = 1 + shape / mean
    concentration = np.empty((groups, n))
    concentration[0] = channel + shape
    u = (1 - hub) * (channel + shape) / rate + hub * channel
    u = u / u.sum() if u.sum() > 0 else np.full(n, 1 / n)
    if groups == 1:
        return dict(concentration=concentration, profile=u[None, :],
                    hubs=dict(probability=hub, shape=channel.copy(), rate=rate))
    low, high, points = PRIOR["popularity_grid"]
    grid = log_grid(low * n, high * n, points)
    for g in range(groups):
        logs = np.array([log_dirichlet_multinomial(own[g], b * u) for b in grid])
        w = np.exp(logs - logs.max())
        b = np.exp((w * np.log(grid)).sum() / w.sum())
        concentration[g] = own[g] + b * u
    sums = concentration.sum(axis=1, keepdims=True)
    profile = np.where(sums > 0, concentration / np.where(sums > 0, sums, 1), 1 / n)
    return dict(concentration=concentration, profile=profile, hubs=None)


def build_prior(c, kish, group_of):
    """attention-prior.ts buildAttentionPrior (background auto): effective counts, the profile's
    posterior and each row's strength posterior on its grid, two passes."""
    n = c.shape[0]
    groups = int(group_of.max()) + 1 if n else 1
    row_of = np.repeat(np.arange(n), np.diff(c.indptr))
    effective = kish[row_of] * c.data
    totals = np.bincount(row_of, weights=effective, minlength=n)
    grid = log_grid(PRIOR["strength_grid_low"], max(1.0, n - 1.0), PRIOR["strength_grid_points"])
    strength = np.full(n, np.sqrt(grid[0] * grid[-1]))
    silent = ~(totals > 0)
    log_grid_values = np.log(grid)
    for _ in range(PRIOR["passes"]):
        d = np.where(silent, 0.0, np.minimum(1, (1 + strength) / np.where(silent, 1, totals + strength)))
        w = d[row_of] * effective
        channel = np.bincount(c.indices, weights=w, minlength=n)
        if groups == 1:
            own = channel[None, :]
        else:
            own = np.zeros((groups, n))
            np.add.at(own, (group_of[row_of], c.indices), w)
        post = profile_posterior(own, channel, groups)
        profile = post["profile"]
        mine = profile[group_of, np.arange(n)]
        # Row log likelihoods on the grid (rows x grid), a Polya likelihood per row.
        scale = grid[None, :] / (1 - mine)[:, None]
        a = scale[row_of] * profile[group_of[row_of], c.indices][:, None]
        cells = gammaln(effective[:, None] + a) - gammaln(a)
        logs = row_sums(cells, c.indptr)
        logs += gammaln(grid)[None, :] - gammaln(totals[:, None] + grid[None, :])
        logs[silent] = 0.0
        weights = np.exp(logs - logs.max(axis=1, keepdims=True))
        sums = weights.sum(axis=1, keepdims=True)
        cumulative = np.cumsum(weights / sums, axis=1)
        cumulative[:, -1] = 1.0
        strength = np.exp((weights * log_grid_values[None, :]).sum(axis=1) / sums[:, 0])
    return dict(n=n, effective=effective, totals=totals, row_of=row_of, grid=grid,
                cumulative=cumulative, strength=strength, group_of=group_of, groups=groups, **post)


def row_sums(cells, indptr):
    """Per-row sums of CSR-ordered entries (any trailing axes); 0 for empty rows."""
    n = len(indptr) - 1
    out = np.zeros((n,) + cells.shape[1:])
    nonempty = np.flatnonzero(np.diff(indptr) > 0)
    if len(nonempty):
        out[nonempty] = np.add.reduceat(cells, indptr[nonempty], axis=0)
    return out


class Rows:
    """A_ij = values_ij + rest_i p^(g(i))_j for j != i, A_ii = values_ii (attention-rows.ts),
    held as the transpose of the stored values (what x A needs)."""

    def __init__(self, values_t, rest, profile, group_of):
        self.values_t, self.rest, self.profile, self.group_of = values_t, rest, profile, group_of

    def left_multiply(self, x):
        """x A (leftMultiply): sparse part, one rank-one term per profile, its diagonal removed."""
        xr = x * self.rest
        out = -xr * self.profile[self.group_of, np.arange(len(x))]
        if self.profile.shape[0] == 1:
            out += xr.sum() * self.profile[0]
        else:
            out += np.bincount(self.group_of, weights=xr, minlength=self.profile.shape[0]) @ self.profile
        return out + self.values_t @ x

    def dense(self):
        """A as a dense array (small n)."""
        n = len(self.rest)
        a = self.rest[:, None] * self.profile[self.group_of]
        np.fill_diagonal(a, 0.0)
        return a + self.values_t.T.toarray()

    def column(self, j):
        """A_ij over i, A_jj = 0 (the top member's column, for contributors)."""
        col = self.values_t[[j], :].toarray().ravel() + self.rest * self.profile[self.group_of, j]
        col[j] = 0.0
        return col


def point_rows(c, prior):
    """attention-prior.ts pointRowsFromPrior."""
    n, totals, alpha = prior["n"], prior["totals"], prior["strength"]
    off = 1 - prior["profile"][prior["group_of"], np.arange(n)]
    silent = ~(totals > 0)
    denom = np.where(silent, 1.0, totals + alpha)
    values = sp.csr_matrix((prior["effective"] / denom[prior["row_of"]], c.indices, c.indptr), shape=c.shape)
    rest = np.where(silent, 1 / off, alpha / denom / off)
    return Rows(values.T.tocsr(), rest, prior["profile"], prior["group_of"])


def stationary(rows, tolerance, start=None, max_iterations=100_000):
    n = len(rows.rest)
    x = np.full(n, 1.0 / n) if start is None else start / start.sum()
    sigma = 0.0 if n > 2 else 0.5
    previous = np.inf
    for iteration in range(1, max_iterations + 1):
        y = sigma * x + (1 - sigma) * rows.left_multiply(x)
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


def dirichlet_rows(rng, shapes):
    g = rng.standard_gamma(shapes)
    return g / g.sum(axis=-1, keepdims=True)


def draw_profiles(prior, rng):
    """posterior-draws.ts drawProfiles: m per group from its posterior (hub columns by their
    posterior hub probability), and its running sums per group."""
    conc = prior["concentration"]
    hubs = prior["hubs"]
    if hubs is None:
        m = dirichlet_rows(rng, conc)
    else:
        is_hub = rng.random(conc.shape[1]) < hubs["probability"]
        shapes = np.where(is_hub, np.maximum(hubs["shape"], 1e-300), conc[0])
        g = rng.standard_gamma(shapes)
        g = np.where(is_hub, g, g / hubs["rate"])
        m = (g / g.sum())[None, :]
    cumulative = np.cumsum(m, axis=1)
    cumulative[:, -1] = 1.0
    return m, cumulative


def draw_strengths(prior, rng):
    """alpha_i from each row's grid posterior: one uniform per row, inverted on the cumulative."""
    u = rng.random(prior["n"])
    index = (prior["cumulative"] <= u[:, None]).sum(axis=1)
    return prior["grid"][np.minimum(index, len(prior["grid"]) - 1)]


def pooled_direction(prior, start, alpha, pooled, m, rng):
    """posterior-draws.ts drawPooled: rows too heavy in their group's sum are drawn per cell;
    each group with pooled rows takes one W_g ~ Dirichlet(A_g m_g)."""
    g_of, groups = prior["group_of"], prior["groups"]
    w = start * alpha / (prior["totals"] + alpha)
    part = w * w / (alpha + 1)
    squares = np.bincount(g_of[pooled], weights=part[pooled], minlength=groups)
    heavy = pooled & (part > POOL_HEAVY * squares[g_of])
    pooled = pooled & ~heavy
    sums = np.bincount(g_of[pooled], weights=w[pooled], minlength=groups)
    squares = np.bincount(g_of[pooled], weights=part[pooled], minlength=groups)
    rest_profile = m.copy()
    for g in np.flatnonzero(squares > 0):
        strength = max(1e-3, sums[g] ** 2 / squares[g] - 1)
        rest_profile[g] = dirichlet_rows(rng, np.maximum(strength * m[g], 1e-300))
    return pooled, heavy, rest_profile


def stick_atoms(prior, rows, alpha, m_cum, rng):
    """Sethuraman's sticks for `rows`, all at once: each stick multiplies the remainder by
    (1 - U)^(1/alpha), i.e. the log remainder falls by E/alpha with E ~ Exp(1), and sticks are cut
    while more than STICK_REMAINDER is left, i.e. while the running sum of E is below
    L = alpha ln(1/STICK_REMAINDER). The running sums are drawn per row in one cumulative sum
    over a budget of exponentials (rows that run out, rare, are drawn again with a larger one);
    atoms from m^(i) (j = i redrawn). Returns (row, column, piece, remainder per row)."""
    limit = alpha * np.log(1 / STICK_REMAINDER)
    out_row, out_before, out_after = [], [], []
    remainder = np.empty(len(rows))
    todo = np.arange(len(rows))
    spare = 6.0
    while len(todo):
        lim = limit[todo]
        budget = np.ceil(lim + spare * np.sqrt(lim) + 10).astype(np.int64)
        first = np.cumsum(budget) - budget
        e = rng.standard_exponential(int(budget.sum()))
        s = np.cumsum(e)
        base = np.repeat(s[first] - e[first], budget)
        after = s - base
        before = after - e
        owner = np.repeat(np.arange(len(todo)), budget)
        done = after[first + budget - 1] >= lim
        keep = (before < lim[owner]) & done[owner]
        a = np.repeat(alpha[todo], budget)[keep]
        out_row.append(rows[todo][owner[keep]])
        out_before.append(np.exp(-before[keep] / a))
        out_after.append(np.exp(-after[keep] / a))
        final = keep & (after >= lim[owner])  # one per finished row: the stick that ends it
        ends = np.zeros(len(todo))
        ends[owner[final]] = after[final]
        remainder[todo[done]] = np.exp(-ends[done] / alpha[todo][done])
        todo = todo[~done]
        spare *= 2
    row = np.concatenate(out_row)
    piece = np.concatenate(out_before) - np.concatenate(out_after)
    g = prior["group_of"][row]
    column = np.empty(len(row), dtype=np.int64)
    pending = np.arange(len(row))
    while len(pending):
        u = rng.random(len(pending))
        if prior["groups"] == 1:
            j = np.searchsorted(m_cum[0], u, side="right")
        else:
            j = np.array([np.searchsorted(m_cum[gg], uu, side="right") for gg, uu in zip(g[pending], u)])
        j = np.minimum(j, m_cum.shape[1] - 1)
        column[pending] = j
        pending = pending[j == row[pending]]
    return row, column, piece, remainder


def draw_rows(c, prior, start, rng):
    """posterior-draws.ts drawMatrixInto, one whole draw in numpy calls: observed cells
    Gamma(C^_ij), the prior part Gamma(alpha_i) W with W per cell (n <= 64, and heavy rows),
    by sticks (alpha ln 1e6 < n - 1) or along the group's pooled direction W_g."""
    n = prior["n"]
    m, m_cum = draw_profiles(prior, rng)
    alpha = draw_strengths(prior, rng)
    g_of, row_of = prior["group_of"], prior["row_of"]
    exact = n <= EXACT_MEMBERS
    if exact:
        cells = np.ones(n, dtype=bool)
        pooled = sticks = np.zeros(n, dtype=bool)
        rest_profile = m
    else:
        pooled = alpha * np.log(1 / STICK_REMAINDER) >= n - 1
        sticks = ~pooled
        pooled, cells, rest_profile = pooled_direction(prior, start, alpha, pooled, m, rng)
    observed = rng.standard_gamma(prior["effective"])
    total = np.bincount(row_of, weights=observed, minlength=n)
    rows_e, cols_e, vals_e = [row_of], [c.indices], [observed]
    # Per cell: Gamma(alpha m^(i)_j) for every j != i.
    cell_rows = np.flatnonzero(cells)
    if len(cell_rows):
        mine = m[g_of[cell_rows], cell_rows]
        shapes = (alpha[cell_rows] / (1 - mine))[:, None] * m[g_of[cell_rows]]
        shapes[np.arange(len(cell_rows)), cell_rows] = 0
        ok = shapes > 0
        g = np.zeros_like(shapes)
        g[ok] = rng.standard_gamma(shapes[ok])
        r, j = np.nonzero(ok)
        rows_e.append(cell_rows[r])
        cols_e.append(j)
        vals_e.append(g[ok])
        total[cell_rows] += g.sum(axis=1)
    rest = np.zeros(n)
    prior_part = np.zeros(n)
    lumped = pooled | sticks
    prior_part[lumped] = rng.standard_gamma(alpha[lumped])
    total += prior_part
    rest_off = 1 - rest_profile[g_of, np.arange(n)]
    rest[pooled] = prior_part[pooled] / total[pooled] / rest_off[pooled]
    stick_rows = np.flatnonzero(sticks)
    if len(stick_rows):
        r, j, piece, left = stick_atoms(prior, stick_rows, alpha[stick_rows], m_cum, rng)
        rows_e.append(r)
        cols_e.append(j)
        vals_e.append(prior_part[r] * piece)
        rest[stick_rows] = prior_part[stick_rows] * left / total[stick_rows] / rest_off[stick_rows]
    rows = np.concatenate(rows_e)
    vals = np.concatenate(vals_e) / total[rows]
    values_t = sp.csr_matrix((vals, (np.concatenate(cols_e), rows)), shape=(n, n))
    return Rows(values_t, rest, rest_profile, g_of)


def second_eigenvalue(rows, sigma, s):
    n = len(rows.rest)
    if n <= 150:
        t = sigma * np.eye(n) + (1 - sigma) * rows.dense()
        return min(1.0, float(np.sort(np.abs(np.linalg.eigvals(t)))[::-1][1]))

    def product(x):  # x(T - 1s) as a column operator on x's transpose
        x = np.asarray(x).ravel()
        return sigma * x + (1 - sigma) * rows.left_multiply(x) - x.sum() * s

    op = LinearOperator((n, n), matvec=product, dtype=float)
    return float(np.abs(eigs(op, k=1, which="LM", tol=1e-7, return_eigenvectors=False))[0])


def r6(x):
    return round(float(x), 6) + 0.0


def interval(sample, mass):
    lo, hi = np.quantile(sample, [(1 - mass) / 2, (1 + mass) / 2], axis=-1)  # Hyndman & Fan 7
    return lo, hi


def assemble(members, rows, shares, draws, voices_draws, lam2, groups_closed, clusters, s):
    n = len(members)
    threshold = max(0.30, 2 / n)
    lo, hi = interval(draws.T, s["interval"])
    p_above = (draws >= threshold).mean(axis=0)
    received = rows.left_multiply(np.ones(n))
    order = sorted(range(n), key=lambda i: (-r6(shares[i]), members[i]))
    voices = 1 / np.square(shares).sum()
    vlo, vhi = interval(voices_draws, s["interval"])
    top = order[0]
    col = rows.column(top)
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
    c, kish = count_matrix(members, src, dst, weight)
    lap("signals+counts")
    groups_closed = closed_groups(c)
    labels = [ledger["groups"].at(m, until, None) for m in members]
    clusters = louvain(c, args.seed) if all(x is None for x in labels) else None
    group_of = prior_groups(c)
    lap("structure")
    n, sigma = len(members), s["selfWeight"]
    prior = build_prior(c, kish, group_of)
    rows = point_rows(c, prior)
    shares, _ = stationary(rows, 1e-12)
    lap("point")
    rng = np.random.default_rng(args.seed)
    draws = np.empty((s["samples"], n))
    for k in range(s["samples"]):
        draws[k], _ = stationary(draw_rows(c, prior, shares, rng), args.draw_tolerance, start=shares)
    voices_draws = 1 / np.square(draws).sum(axis=1)
    lap("draws")
    lam2 = second_eigenvalue(rows, sigma, shares)
    lap("lambda2")
    report = assemble(members, rows, shares, draws, voices_draws, lam2, groups_closed, clusters, s)
    report["settings"] = dict(priorStrength=r6(np.median(prior["strength"])),
                              posterior="exact" if n <= EXACT_MEMBERS else "pooled")
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
