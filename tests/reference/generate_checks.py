#!/usr/bin/env python3
"""Write reference values for the assumption checks and follow-ups of slopewise.

For every plan in plans/ this writes expected/checks_NAME.json with the numbers behind
the contract's "results.json keys added by later capabilities" (shared/contract.md):
normality and spread of the residuals, influence, covariate balance, Tukey-Kramer
p-values, partial eta squared, Johnson-Neyman regions and group differences at the
covariate quartiles. Everything is computed with scipy and statsmodels at the versions
pinned in requirements.txt, on design matrices built by hand with numpy.

Run generate.py first (it writes the data, the plans and expected/NAME.json, which this
script reads back and cross-checks), then this script:

    /tmp/refvenv/bin/python tests/reference/generate.py
    /tmp/refvenv/bin/python tests/reference/generate_checks.py

The output is deterministic: running it twice gives byte-identical files.
"""

from __future__ import annotations

import csv
import json
import math
import sys
import tomllib
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.dont_write_bytecode = True  # importing generate.py must leave no __pycache__ here

import generate as gen  # noqa: E402  (helpers and plan semantics shared with generate.py)

import numpy as np  # noqa: E402
import scipy.optimize  # noqa: E402
import scipy.stats  # noqa: E402
from scipy import integrate, special  # noqa: E402
from statsmodels.stats.outliers_influence import OLSInfluence  # noqa: E402

# The two invented Johnson-Neyman cases and the property each must have (asserted below).
JN_EMPTY, JN_ONE_SIDED = "jn_empty", "jn_one_sided"


# ---------------------------------------------------------------------------
# Rows, with their position in the file
# ---------------------------------------------------------------------------


def numbered_rows(plan: dict, plan_path: Path):
    """The rows generate.select_rows keeps, with each one's 1-based data row number.

    Row numbers count every data row of the file (header excluded), dropped rows
    included, as the contract's checks.influence.flagged[].row does. The rules are
    generate.select_rows' own (keep filters, then missing response, covariate, group);
    the result is asserted equal to what that function returns, so the two cannot drift.
    """
    data, model = plan["data"], plan["model"]
    missing = set(data.get("missing", gen.DEFAULT_MISSING))
    tf = model.get("transform", {})
    y_name, x_name, g_name = model["response"], model["covariate"], model["group"]
    rows, ys, xs, gs = [], [], [], []
    with (plan_path.parent / data["path"]).open(newline="") as fh:
        for number, row in enumerate(csv.DictReader(fh), start=1):
            keep = all(
                row[r["column"]] == r["equals"] if "equals" in r
                else row[r["column"]] in r["one_of"]
                for r in data.get("keep", [])
            )
            if not keep or any(row[c] in missing for c in (y_name, x_name, g_name)):
                continue
            rows.append(number)
            ys.append(gen.transform(tf.get("response", "none"), float(row[y_name])))
            xs.append(gen.transform(tf.get("covariate", "none"), float(row[x_name])))
            gs.append(row[g_name])
    y0, x0, g0, _ = gen.select_rows(plan, plan_path)
    assert np.array_equal(np.array(ys), y0) and np.array_equal(np.array(xs), x0) and gs == g0
    return np.array(rows), y0, x0, g0


# ---------------------------------------------------------------------------
# Tukey-Kramer p-values
# ---------------------------------------------------------------------------


def range_sf(w: float, k: int) -> float:
    """P(range of k independent standard normals > w), by quadrature.

    From the definition: with the largest of the k values at z, the range is at most w
    when the other k - 1 lie in (z - w, z], so P(R <= w) = k * int phi(z) (Phi(z) -
    Phi(z - w))^(k-1) dz, and since k * int phi Phi^(k-1) dz = 1,
    P(R > w) = k * int phi(z) [a^m - c^m] dz with a = Phi(z), c = Phi(z) - Phi(z - w),
    m = k - 1. Writing a^m - c^m = b * sum_j a^j c^(m-1-j) with b = Phi(z - w) keeps
    every term positive, so tiny tail probabilities keep their relative accuracy.
    The integrand is, up to a bounded factor, exp(-w^2/4 - (z - w/2)^2): 12 either side
    of w/2 leaves out less than exp(-144) of it.
    """
    m = k - 1

    def f(z: float) -> float:
        a = special.ndtr(z)
        b = special.ndtr(z - w)
        # Phi(z) - Phi(z - w), written as a difference of the smaller tails.
        c = special.ndtr(z) - b if z < w / 2 else special.ndtr(w - z) - special.ndtr(-z)
        s = sum(a**j * c ** (m - 1 - j) for j in range(m))
        return k * math.exp(-z * z / 2) / math.sqrt(2 * math.pi) * b * s

    v, _ = integrate.quad(f, w / 2 - 12, max(w / 2 + 12, 12.0), points=[w / 2], epsabs=0,
                          epsrel=1e-13, limit=200)
    return v


def studentized_range_sf(q: float, k: int, df: float) -> float:
    """P(Q > q) for the studentized range Q = R / s, s = sqrt(chi2_df / df) independent
    of the range R (the definition; Tukey 1953, Kramer 1956 for unequal group sizes).

    Integrates P(R > q s) against the density of s, which is
    df^(df/2) / (Gamma(df/2) 2^(df/2 - 1)) s^(df-1) exp(-df s^2 / 2), around the peak
    of the product (the weight is near exp((df - 1) log s - (df + q^2/2) s^2 / 2)).
    A second route beside scipy.stats.studentized_range.sf, which is accurate only to
    about 1e-13 absolute (see tukey()).
    """
    logc = 0.5 * df * math.log(df) - special.gammaln(df / 2) - (df / 2 - 1) * math.log(2)

    def g(s: float) -> float:
        if s <= 0:
            return 0.0
        return math.exp(logc + (df - 1) * math.log(s) - df * s * s / 2) * range_sf(q * s, k)

    peak = math.sqrt((df - 1) / (df + q * q / 2))
    width = 1 / math.sqrt(2 * (df + q * q / 2))
    v, _ = integrate.quad(g, max(0.0, peak - 40 * width), peak + 40 * width, points=[peak],
                          epsabs=0, epsrel=1e-12, limit=200)
    return v


def tukey(pairwise_adjusted: list[dict], k: int) -> list[dict]:
    """Tukey-Kramer p-values (Tukey 1953; Kramer 1956): q = |t| sqrt(2), k groups,
    the common-slope model's df.

    p_tukey is scipy.stats.studentized_range.sf where it agrees with the quadrature
    above to 1e-9 relative. scipy's value is accurate to about 1e-13 absolute only
    (measured here against the exact two-group case: relative error 5e-11 at p = 4e-4,
    2e-7 at p = 9e-8), so for p below about 1e-4 it can be off by more than that, and
    for p below about 1e-13 it is wrong outright (it stays near 1e-13, or gives 0):
    there p_tukey is the quadrature's value and p_tukey_source says so. The quadrature
    is checked here against the exact two-group case, 2 * t.sf(|t|, df), and every value
    against the bounds p_t <= p_tukey <= (k choose 2) p_t (one pair's event is inside
    the range's; the range's is inside the union of all pairs': Bonferroni).
    """
    out = []
    for p in pairwise_adjusted:
        q, df = abs(p["t"]) * math.sqrt(2), p["df"]
        p_scipy = float(scipy.stats.studentized_range.sf(q, k, df))
        p_quad = studentized_range_sf(q, k, df)
        p_t = float(2 * scipy.stats.t.sf(abs(p["t"]), df))
        if k == 2:
            assert gen.close(p_quad, p_t, 1e-11), (p_quad, p_t)
        assert p_t * (1 - 1e-11) <= p_quad <= math.comb(k, 2) * p_t * (1 + 1e-11), (p_quad, p_t)
        if gen.close(p_scipy, p_quad, 1e-9):
            value, source = p_scipy, "scipy.stats.studentized_range.sf"
        else:
            value = p_quad
            source = (f"quadrature of the studentized range integral (generate_checks.py); "
                      f"scipy.stats.studentized_range.sf gives {p_scipy!r} here, "
                      f"outside its accuracy")
        out.append({"a": p["a"], "b": p["b"], "t": p["t"], "df": df, "q": q,
                    "p_tukey": value, "p_tukey_source": source})
    return out


# ---------------------------------------------------------------------------
# Johnson-Neyman regions (Johnson & Neyman 1936; simultaneous form, Potthoff 1964)
# ---------------------------------------------------------------------------


def contrast(k: int, a: int, b: int, x: float) -> np.ndarray:
    """Separate-slopes coefficients (k intercepts, k slopes): line a minus line b at x."""
    c = np.zeros(2 * k)
    c[a], c[b], c[k + a], c[k + b] = 1.0, -1.0, x, -x
    return c


def region(sep, k: int, a: int, b: int, crit: float, x_range: tuple[float, float]) -> dict:
    """Where |D(x)| / se(D(x)) > crit, D(x) the difference of lines a and b at x.

    D(x)^2 - crit^2 Var D(x) = A x^2 + B x + C with, from the separate-slopes model's
    coefficients and covariance, d0 = int_a - int_b, d1 = slope_a - slope_b,
    A = d1^2 - crit^2 V_ss, B = 2 (d0 d1 - crit^2 V_is), C = d0^2 - crit^2 V_ii.
    Its real roots are the bounds; each is polished with brentq on the function itself
    (D and Var D evaluated from the contrast vector, not from A, B, C). The significant
    set is read off segment by segment: the bounds inside the observed range cut it into
    pieces, and each piece is significant when the function is positive at its middle.
    """
    beta, cov = np.asarray(sep.params), np.asarray(sep.cov_params())

    def h(x: float) -> float:
        c = contrast(k, a, b, x)
        return float(c @ beta) ** 2 - crit**2 * float(c @ cov @ c)

    ei, es = contrast(k, a, b, 0.0), contrast(k, a, b, 1.0) - contrast(k, a, b, 0.0)
    d0, d1 = float(ei @ beta), float(es @ beta)
    v_ii, v_ss, v_is = float(ei @ cov @ ei), float(es @ cov @ es), float(ei @ cov @ es)
    qa = d1 * d1 - crit**2 * v_ss
    qb = 2 * (d0 * d1 - crit**2 * v_is)
    qc = d0 * d0 - crit**2 * v_ii
    assert abs(qa) > 1e-12 * (d1 * d1 + crit**2 * v_ss), "degenerate (linear) case"
    disc = qb * qb - 4 * qa * qc
    roots: list[float] = []
    if disc > 0:
        # Numerically stable pair of roots.
        s = -0.5 * (qb + math.copysign(math.sqrt(disc), qb))
        r1, r2 = sorted([s / qa, qc / s])
        mid, reach = (r1 + r2) / 2, (r2 - r1) + 1.0
        for lo, hi in ((r1 - reach, mid), (mid, r2 + reach)):
            assert h(lo) * h(hi) < 0, "no sign change around a bound"
            roots.append(float(scipy.optimize.brentq(h, lo, hi, xtol=1e-14, maxiter=500)))
        assert abs(roots[0] - r1) <= 1e-8 * max(1.0, abs(r1))
        assert abs(roots[1] - r2) <= 1e-8 * max(1.0, abs(r2))
        for r in roots:  # at a bound the t statistic of the contrast is +-crit
            tt = sep.t_test(contrast(k, a, b, r))
            assert gen.close(abs(gen.f64(tt.tvalue)), crit, 1e-8), (gen.f64(tt.tvalue), crit)

    lo_x, hi_x = x_range
    cuts = [lo_x] + [r for r in roots if lo_x < r < hi_x] + [hi_x]
    significant: list[list[float]] = []
    for lo, hi in zip(cuts, cuts[1:]):
        if h((lo + hi) / 2) > 0:
            if significant and significant[-1][1] == lo:
                significant[-1][1] = hi
            else:
                significant.append([lo, hi])
    # The same answer from the shape alone: A > 0 means significant outside the roots
    # (everywhere when there are none), A < 0 between them (nowhere when there are none).
    if roots:
        pieces = [(-math.inf, roots[0]), (roots[1], math.inf)] if qa > 0 else [tuple(roots)]
    else:
        pieces = [(-math.inf, math.inf)] if qa > 0 else []
    clipped = [[max(p, lo_x), min(q, hi_x)] for p, q in pieces if max(p, lo_x) < min(q, hi_x)]
    assert clipped == significant, (clipped, significant)
    # A third check: |t| against crit on a fine grid over the observed range, with the
    # coefficients and covariance from numpy's least squares instead of statsmodels
    # (points within 1e-6 of a bound are left out, where rounding may tip either way).
    X = np.asarray(sep.model.exog)
    y = np.asarray(sep.model.endog)
    b_ls = np.linalg.lstsq(X, y, rcond=None)[0]
    res = y - X @ b_ls
    v_ls = np.linalg.inv(X.T @ X) * float(res @ res) / float(sep.df_resid)
    grid = np.linspace(lo_x, hi_x, 20001)
    cs = np.array([contrast(k, a, b, v) for v in grid])
    t_grid = (cs @ b_ls) / np.sqrt(np.einsum("ij,jk,ik->i", cs, v_ls, cs))
    inside = np.zeros(grid.shape, dtype=bool)
    for lo, hi in significant:
        inside |= (grid >= lo) & (grid <= hi)
    near = np.zeros(grid.shape, dtype=bool)
    for r in roots:
        near |= np.abs(grid - r) < 1e-6
    assert np.all(((np.abs(t_grid) > crit) == inside) | near), "grid disagrees"
    return {"bounds": roots, "significant": significant, "leading_coefficient_positive": qa > 0}


# ---------------------------------------------------------------------------


def checks_for(name: str, plan: dict, plan_path: Path, source: str) -> dict:
    model, tests = plan["model"], plan.get("tests", {})
    alpha = tests.get("alpha", gen.DEFAULT_ALPHA)
    slopes_alpha = tests.get("slopes_alpha", gen.DEFAULT_SLOPES_ALPHA)
    expected = json.loads((gen.EXPECTED_DIR / f"{name}.json").read_text())

    rows, y, x, g = numbered_rows(plan, plan_path)
    n = len(y)
    # Levels exactly as generate.expected_for orders them.
    labels = sorted(set(g), key=lambda s: s.encode("utf-8"))
    levels = model.get("levels", labels)
    k = len(levels)
    assert [gr["level"] for gr in expected["groups"]] == levels
    D = np.array([[1.0 if gi == lev else 0.0 for lev in levels] for gi in g])
    member = [D[:, j] == 1.0 for j in range(k)]

    sep = gen.fit(y, np.column_stack([D, D * x[:, None]]))
    com = gen.fit(y, np.column_stack([D, x]))
    one = gen.fit(y, np.column_stack([np.ones(n), x]))
    # Same fits as expected/NAME.json (generate.py).
    es, ge = expected["equal_slopes"], expected["group_effect"]
    assert gen.close(sep.ssr, es["rss_separate"], 1e-12)
    assert gen.close(com.ssr, es["rss_common"], 1e-12)
    assert gen.close(one.ssr, ge["rss_one_line"], 1e-12)
    _, p_s, _ = sep.compare_f_test(com)
    assert gen.close(float(p_s), es["p_value"], 1e-12)

    pairs = [(a, b) for a in range(k) for b in range(a + 1, k)]

    # --- normality of the separate-slopes residuals: Shapiro & Wilk (1965) ------------
    resid = np.asarray(sep.resid)
    w_all, p_all = scipy.stats.shapiro(resid)
    normality = {"method": "shapiro-wilk",
                 "pooled": {"statistic": float(w_all), "p_value": float(p_all), "n": n},
                 "groups": []}
    for j, lev in enumerate(levels):
        w_j, p_j = scipy.stats.shapiro(resid[member[j]])
        normality["groups"].append({"level": lev, "statistic": float(w_j),
                                    "p_value": float(p_j), "n": int(member[j].sum())})

    # --- spread across groups: Brown & Forsythe (1974), Levene's test about medians --
    lev_stat, lev_p = scipy.stats.levene(*[resid[m] for m in member], center="median")
    # Cross-check: one-way ANOVA F of |residual - group median|, its definition.
    dev = [np.abs(resid[m] - np.median(resid[m])) for m in member]
    assert gen.close(float(lev_stat), float(scipy.stats.f_oneway(*dev).statistic), 1e-10)
    equal_variance = {"method": "brown-forsythe", "statistic": float(lev_stat),
                      "df1": k - 1, "df2": n - k, "p_value": float(lev_p)}

    # --- influence in the model the equal-slopes gate selects ---------------------------
    homogeneous = float(p_s) >= slopes_alpha
    chosen = com if homogeneous else sep
    infl = OLSInfluence(chosen)
    leverage = np.asarray(infl.hat_matrix_diag)
    stud = np.asarray(infl.resid_studentized_external)
    cooks = np.asarray(infl.cooks_distance[0])
    # The hat matrix's trace is the number of coefficients (k + 1, or 2k).
    assert gen.close(float(leverage.sum()), float(k + 1 if homogeneous else 2 * k), 1e-9)
    # Second route, from the textbook definitions (Cook 1977; Belsley, Kuh & Welsch
    # 1980): h = diag(X (X'X)^-1 X'), D_i = e_i^2 h_i / (p s^2 (1 - h_i)^2), and the
    # externally studentized residual with the leave-one-out variance
    # s_(i)^2 = ((n - p) s^2 - e_i^2 / (1 - h_i)) / (n - p - 1). Rows with a residual
    # near zero have relative errors far above the rest, so the check is against the
    # largest value (README.md).
    X = np.asarray(chosen.model.exog)
    n_p = X.shape[1]
    h2 = np.einsum("ij,ji->i", X, np.linalg.solve(X.T @ X, X.T))
    e = np.asarray(chosen.resid)
    s2 = float(e @ e) / (n - n_p)
    cooks2 = e**2 * h2 / (n_p * s2 * (1 - h2) ** 2)
    stud2 = e / np.sqrt(((n - n_p) * s2 - e**2 / (1 - h2)) / (n - n_p - 1) * (1 - h2))
    for got, want in ((leverage, h2), (cooks, cooks2), (stud, stud2)):
        assert np.max(np.abs(got - want)) <= 1e-10 * np.max(np.abs(want))
    influence = {
        "model": "common-slope" if homogeneous else "separate-slopes",
        "row": [int(r) for r in rows],
        "level": list(g),
        "leverage": [float(v) for v in leverage],
        "studentized_residual": [float(v) for v in stud],
        "cooks_distance": [float(v) for v in cooks],
        "max_leverage": float(leverage.max()),
        "max_cooks_distance": float(cooks.max()),
    }

    # --- covariate balance: one-way ANOVA F of x across groups --------------------------
    fo = scipy.stats.f_oneway(*[x[m] for m in member])
    low = max(float(x[m].min()) for m in member)
    high = min(float(x[m].max()) for m in member)
    covariate_balance = {"f": float(fo.statistic), "df1": k - 1, "df2": n - k,
                         "p_value": float(fo.pvalue),
                         "overlap": [low, high] if low <= high else None}

    # --- Tukey-Kramer on the adjusted-mean differences ----------------------------------
    pairwise_adjusted = []
    for (a, b), want in zip(pairs, expected["pairwise_adjusted"]):
        c = np.zeros(k + 1)
        c[a], c[b] = 1.0, -1.0
        tt = com.t_test(c)
        t = gen.f64(tt.tvalue)
        assert (want["a"], want["b"]) == (levels[a], levels[b]) and gen.close(t, want["t"], 1e-12)
        pairwise_adjusted.append({"a": levels[a], "b": levels[b], "t": t,
                                  "df": float(com.df_resid)})
    tukey_rows = tukey(pairwise_adjusted, k)
    for r in tukey_rows:
        r["df"] = int(r["df"])

    # --- partial eta squared from the two extra-sum-of-squares tests ---------------------
    ss_slopes = float(com.ssr - sep.ssr)
    ss_groups = float(one.ssr - com.ssr)
    effect_sizes = {"equal_slopes_partial_eta2": ss_slopes / (ss_slopes + float(sep.ssr)),
                    "group_effect_partial_eta2": ss_groups / (ss_groups + float(com.ssr))}

    # --- Johnson-Neyman regions from the separate-slopes model --------------------------
    df_sep = float(sep.df_resid)
    assert df_sep == n - 2 * k
    x_range = (float(x.min()), float(x.max()))
    crit = {"johnson-neyman": float(scipy.stats.t.ppf(1 - alpha / 2, df_sep)),
            # Potthoff (1964): simultaneous over all x, Scheffe-type bound on 2 df.
            "johnson-neyman-simultaneous":
                math.sqrt(2 * float(scipy.stats.f.ppf(1 - alpha, 2, df_sep)))}
    regions, shapes = [], {}
    for a, b in pairs:
        for method, cval in crit.items():
            r = region(sep, k, a, b, cval, x_range)
            shapes[(a, b, method)] = r.pop("leading_coefficient_positive")
            regions.append({"a": levels[a], "b": levels[b], "method": method, **r})

    # --- differences of the separate lines at the covariate quartiles --------------------
    quartiles = [float(v) for v in np.percentile(x, [25, 50, 75])]
    differences_at = []
    for a, b in pairs:
        for at in quartiles:
            tt = sep.t_test(contrast(k, a, b, at))
            assert tt.df_denom == df_sep
            ci = np.asarray(tt.conf_int(alpha)).reshape(-1)
            differences_at.append({
                "a": levels[a], "b": levels[b], "at": at,
                "difference": gen.f64(tt.effect), "se": gen.f64(tt.sd),
                "t": gen.f64(tt.tvalue), "df": n - 2 * k, "p_value": gen.f64(tt.pvalue),
                "ci": [float(ci[0]), float(ci[1])],
            })

    result = {
        "source": f"scipy.stats and statsmodels on numpy design matrices, "
                  f"tests/reference/generate_checks.py; {source}",
        "rows_used": n,
        "normality": normality,
        "equal_variance": equal_variance,
        "influence": influence,
        "covariate_balance": covariate_balance,
        "tukey": tukey_rows,
        "effect_sizes": effect_sizes,
        "observed_range": list(x_range),
        "critical_values": crit,
        "regions": regions,
        "quartiles": quartiles,
        "differences_at": differences_at,
    }
    assert_case(name, result, shapes, x_range, sep, k)
    return result


def assert_case(name: str, result: dict, shapes: dict, x_range, sep, k: int) -> None:
    """The invented Johnson-Neyman cases must show what they were made for."""
    if name not in (JN_EMPTY, JN_ONE_SIDED):
        return
    assert k == 2
    by = {r["method"]: r for r in result["regions"]}
    point = by["johnson-neyman"]
    lo_x, hi_x = x_range
    if name == JN_EMPTY:
        # Nothing significant inside the observed range, pointwise (so neither
        # simultaneously, whose critical value is larger).
        assert point["significant"] == [] and by["johnson-neyman-simultaneous"]["significant"] == []
        # Nearly parallel: the slope difference alone is not significant (A < 0).
        assert not shapes[(0, 1, "johnson-neyman")]
    else:
        b = point["bounds"]
        inside = [r for r in b if lo_x < r < hi_x]
        assert shapes[(0, 1, "johnson-neyman")], "significant outside the roots"
        assert len(b) == 2 and len(inside) == 1, b
        # The lines cross inside the observed range, between the two bounds.
        beta = np.asarray(sep.params)
        cross = -(beta[0] - beta[1]) / (beta[2] - beta[3])
        assert lo_x < cross < hi_x and b[0] < cross < b[1], (cross, b)
        # One-sided: a single interval from the inside bound to one end of the range.
        assert len(point["significant"]) == 1
        s_lo, s_hi = point["significant"][0]
        assert (s_lo == inside[0] and s_hi == hi_x) or (s_lo == lo_x and s_hi == inside[0])


def main() -> None:
    source = gen.check_versions()
    gen.EXPECTED_DIR.mkdir(parents=True, exist_ok=True)
    names = sorted(p.stem for p in gen.PLAN_DIR.glob("*.toml") if not p.stem.startswith("limits_"))
    assert set(names) == set(gen.PLANS), "plans/ differs from generate.py's PLANS: rerun it"
    assert JN_EMPTY in names and JN_ONE_SIDED in names
    for name in names:
        path = gen.PLAN_DIR / f"{name}.toml"
        plan = tomllib.loads(path.read_text())
        result = checks_for(name, plan, path, source)
        gen.write_json(gen.EXPECTED_DIR / f"checks_{name}.json", result)
        inf = result["influence"]
        jn = [r["bounds"] for r in result["regions"] if r["method"] == "johnson-neyman"]
        print(f"{name}: influence in {inf['model']} model, max Cook's D "
              f"{inf['max_cooks_distance']:.4g} (row "
              f"{inf['row'][int(np.argmax(inf['cooks_distance']))]}), "
              f"max leverage {inf['max_leverage']:.4g}; pointwise JN bounds "
              f"{[[round(v, 4) for v in bd] for bd in jn]}")


if __name__ == "__main__":
    main()
