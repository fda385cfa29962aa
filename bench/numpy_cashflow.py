#!/usr/bin/python3
"""NumPy yardstick for the cash-flow engine: the monthly step of DESIGN.md section 4 for fixed-rate
level-pay loans, vectorised over loans (one NumPy array per loan field), months looped in Python.

Loans and assumption sets are those of bench/cashflow_cases.cpp, built from the same integer
formulas, so the pool totals printed here are comparable with the engine's to ~1e-12.

  /usr/bin/python3 bench/numpy_cashflow.py                      # 100k and 1M loans, every case
  /usr/bin/python3 bench/numpy_cashflow.py --loans 100000 --repeat 3 --cases constant
  /usr/bin/python3 bench/numpy_cashflow.py --check              # cross-check pool totals as JSON
  /usr/bin/python3 bench/numpy_cashflow.py --check --against build/bench/cashflow_check

With --against, runs that program (same --loans/--seed), compares every pool total and the monthly
cash flow of the engine (1 and 2 threads, and summed from its loan totals) and the tight loop
with NumPy's to 1e-9 relative, and exits 1 on any difference. Needs Debian's python3-numpy: call
/usr/bin/python3 (another python3 on PATH may lack NumPy).
"""

import argparse
import json
import resource
import subprocess
import sys
import time

try:
    import numpy as np
except ImportError:
    sys.exit(f"numpy_cashflow.py: {sys.executable} has no NumPy; run it with /usr/bin/python3 "
             "(Debian's python3-numpy: apt-get install python3-numpy)")

SEED = 2026
TOLERANCE = 1e-9       # relative
ABSOLUTE_FLOOR = 1e-6  # dollars: amounts this close to zero compare equal


# ---- Loans (bench/cashflow_cases.cpp: make_fixed_loans, make_check_loans) ------------------------

def splitmix64(x):
    with np.errstate(over="ignore"):
        z = x + np.uint64(0x9E3779B97F4A7C15)
        z = (z ^ (z >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
        z = (z ^ (z >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
        return z ^ (z >> np.uint64(31))


def uniform(seed, j, stream):
    """Uniform on [0, 1) with 53 bits for loans j (uint64 array) and draw `stream`."""
    with np.errstate(over="ignore"):
        key = (np.uint64(seed) << np.uint64(40)) + j * np.uint64(8) + np.uint64(stream)
    return (splitmix64(key) >> np.uint64(11)).astype(np.float64) * 2.0 ** -53


def fixed_loans(count, seed):
    j = np.arange(count, dtype=np.uint64)
    skewed = uniform(seed, j, 0) * uniform(seed, j, 1)
    age = np.floor(uniform(seed, j, 3) * 61.0).astype(np.int64)
    return {
        "balance": 50.0 * (1200.0 + np.floor(18000.0 * skewed)),
        "rate": (40 + np.floor(uniform(seed, j, 2) * 25.0).astype(np.int64)) / 800.0,
        "fee": np.full(count, 0.0025),
        "remaining": 360 - age,
        "age": age,
        "delinquent": uniform(seed, j, 4) < 0.02,
    }


def check_loans(count, seed):
    hand = {
        "balance": np.array([300000.0, 150000.5, 425000.0]),
        "rate": np.array([0.065, 0.0525, 0.07875]),
        "fee": np.array([0.0025, 0.0025, 0.00375]),
        "remaining": np.array([358, 300, 170], dtype=np.int64),
        "age": np.array([2, 60, 10], dtype=np.int64),
        "delinquent": np.array([False, True, False]),
    }
    rest = fixed_loans(count - 3, seed)
    return {k: np.concatenate([hand[k], rest[k]]) for k in hand}


# ---- Assumptions (curves/curves.h; bench/cashflow_cases.cpp: bench_cases, check_cases) -----------

def psa_cpr(multiple, age):
    return multiple * 0.06 * min(1.0, max(age, 0) / 30.0)


def sda_cdr(multiple, age):
    age = max(age, 0)
    if age <= 30:
        cdr = 0.0002 * age
    elif age <= 60:
        cdr = 0.006
    elif age <= 120:
        cdr = 0.006 - 0.000095 * (age - 60)
    else:
        cdr = 0.0003
    return multiple * cdr


def monthly_from_annual(annual):
    """SMM or MDR from CPR or CDR: 1 - (1 - annual)^(1/12)."""
    return -np.expm1(np.log1p(-annual) / 12.0)


def curve(shape, value, by_age=None):
    """A curve as (shape, value or values, reads loan age?); PSA and SDA read loan age."""
    return {"shape": shape, "value": value,
            "by_age": shape in ("psa", "sda") if by_age is None else by_age}


def table(c, convert):
    """by_month[k] for k = 0..hold (k = 0 repeats month 1), as curves' MonthlyTable."""
    shape = c["shape"]
    hold = {"constant": 1, "psa": 30, "sda": 120}.get(shape) or max(1, len(c["value"]))

    def value(k):
        if shape == "constant":
            return c["value"]
        if shape == "vector":
            return c["value"][min(k, len(c["value"])) - 1]
        return (psa_cpr if shape == "psa" else sda_cdr)(c["value"], k)

    by_month = [0.0] + [float(convert(value(k))) for k in range(1, hold + 1)]
    by_month[0] = by_month[1]
    return {"by_month": np.array(by_month), "hold": hold, "by_age": c["by_age"]}


def case(prepay, default, severity, lag=12, advancing=False, delinquent_default=False):
    return {"smm": table(prepay, monthly_from_annual), "mdr": table(default, monthly_from_annual),
            "severity": table(severity, lambda v: v), "lag": lag, "advancing": advancing,
            "delinquent_default": delinquent_default}


def bench_cases():
    cpr_vector = [(2.0 + (37 * k % 101) / 10.0) / 100.0 for k in range(1, 361)]
    forty = curve("constant", 0.40)
    return {
        "constant": case(curve("constant", 0.08), curve("constant", 0.01), forty),
        "psa_sda": case(curve("psa", 1.5), curve("sda", 2.0), forty),
        "cpr_vector": case(curve("vector", cpr_vector, by_age=False), curve("constant", 0.01),
                           forty),
        "all_options": case(curve("psa", 1.5), curve("sda", 2.0), forty, advancing=True,
                            delinquent_default=True),
    }


def check_cases():
    cases = bench_cases()
    severity = [(29.0 + k) / 100.0 for k in range(1, 25)]
    cases["sev_vector_lag0"] = case(curve("constant", 0.08), curve("constant", 0.02),
                                    curve("vector", severity, by_age=True), lag=0,
                                    advancing=True, delinquent_default=True)
    return cases


# ---- The projection ------------------------------------------------------------------------------

FIELDS = ["begin_balance", "defaults", "sched_principal", "prepayment", "gross_interest",
          "servicing", "net_interest", "advanced_interest", "loss", "recovery", "end_balance"]


def monthly(tab, age, t):
    """This month's rate: one number (projection-month curve) or one per loan (loan-age curve)."""
    if tab["by_age"]:
        return tab["by_month"][np.minimum(age + t, tab["hold"])]
    return tab["by_month"][min(t, tab["hold"])]


def project(loans, a):
    """Pool sums by month (arrays, index t - 1 = month t) and the number of months."""
    balance = loans["balance"].copy()
    c12 = loans["rate"] / 12.0
    s12 = loans["fee"] / 12.0
    n12 = c12 - s12
    remaining = loans["remaining"]
    age = loans["age"]
    payment = balance * c12 / (1.0 - (1.0 + c12) ** (-remaining.astype(np.float64)))
    delinquent = loans["delinquent"] & a["delinquent_default"]
    lag = a["lag"]
    horizon = int(remaining.max())
    span = horizon + lag
    s = {f: np.zeros(span) for f in FIELDS}
    advance_added = np.zeros(span)

    for t in range(1, horizon + 1):
        m = t - 1
        smm = monthly(a["smm"], age, t)
        mdr = monthly(a["mdr"], age, t)
        severity = monthly(a["severity"], age, t)
        if t == 1 and delinquent.any():
            mdr = np.where(delinquent, 1.0, mdr)
        defaulted = mdr * balance
        performing = balance - defaulted
        pay = payment * (1.0 - mdr)
        gross = performing * c12
        sched = np.where(t >= remaining, performing, pay - gross)
        prepay = smm * (performing - sched)
        end = performing - sched - prepay
        if a["advancing"]:
            # Advances (net interest for `lag` months) come out of the recovery.
            recovery = defaulted * np.maximum(0.0, 1.0 - severity - n12 * lag)
            advance_added[m] = np.sum(defaulted * n12)
        else:
            recovery = defaulted * (1.0 - severity)
        d_total = np.sum(defaulted)
        r_total = np.sum(recovery)
        s["begin_balance"][m] = np.sum(balance)
        s["defaults"][m] = d_total
        s["sched_principal"][m] = np.sum(sched)
        s["prepayment"][m] = np.sum(prepay)
        s["gross_interest"][m] = np.sum(gross)
        s["servicing"][m] = np.sum(performing * s12)
        s["net_interest"][m] = np.sum(performing * n12)
        s["end_balance"][m] = np.sum(end)
        s["recovery"][m + lag] = r_total
        s["loss"][m + lag] = d_total - r_total
        balance = end
        payment = pay * (1.0 - smm)

    if a["advancing"]:  # balance defaulting in month t earns advances in months t .. t + lag - 1
        for m in range(span):
            s["advanced_interest"][m] = np.sum(advance_added[max(0, m - lag + 1):m + 1])
        s["net_interest"] += s["advanced_interest"]
    cash = s["net_interest"] + s["sched_principal"] + s["prepayment"] + s["recovery"]
    months = span
    while months > 1 and not (s["begin_balance"][months - 1] or s["defaults"][months - 1] or
                              s["loss"][months - 1] or cash[months - 1]):
        months -= 1
    s = {f: v[:months] for f, v in s.items()}
    s["cash_flow"] = cash[:months]
    return s, months


def loan_months(loans, a):
    gone = loans["delinquent"] & a["delinquent_default"]
    return int(np.where(gone, 1, loans["remaining"]).sum())


def totals(sums, months):
    out = {"months": months}
    out.update({f: float(np.sum(v)) for f, v in sums.items()})
    out["cash_flow_by_month"] = [float(x) for x in sums["cash_flow"]]
    return out


# ---- Cross-check ---------------------------------------------------------------------------------

def close(a, b):
    return abs(a - b) <= max(TOLERANCE * max(abs(a), abs(b)), ABSOLUTE_FLOOR)


def compare(ours, theirs):
    """Differences between NumPy's results and the C++ program's, as messages."""
    problems = []
    for name, mine in ours["cases"].items():
        row = theirs["cases"].get(name)
        if row is None:
            problems.append(f"{name}: missing from the C++ output")
            continue
        for impl, values in sorted(row.items()):
            for field, value in values.items():
                expect = mine.get(field)
                where = f"{name} / {impl} / {field}"
                if field == "months":
                    if value != expect:
                        problems.append(f"{where}: {value} months, NumPy {expect}")
                elif field == "cash_flow_by_month":
                    if len(value) != len(expect):
                        problems.append(f"{where}: {len(value)} months, NumPy {len(expect)}")
                        continue
                    for k, (x, y) in enumerate(zip(value, expect)):
                        if not close(x, y):
                            problems.append(f"{where}[month {k + 1}]: {x!r}, NumPy {y!r}")
                            break
                elif not close(value, expect):
                    problems.append(f"{where}: {value!r}, NumPy {expect!r} "
                                    f"(relative {abs(value - expect) / max(abs(expect), 1e-300):.2e})")
        # The engine and the tight loop promise the same bits on 1 and 2 threads.
        for program in ("engine", "tight"):
            one, two = row.get(program + "_threads1"), row.get(program + "_threads2")
            if one is not None and one != two:
                problems.append(f"{name} / {program}: 1 and 2 threads differ")
    return problems


def run_check(args):
    loans = check_loans(args.loans, args.seed)
    ours = {"loans": args.loans, "seed": args.seed, "cases": {}}
    for name, a in check_cases().items():
        ours["cases"][name] = totals(*project(loans, a))
    if not args.against:
        print(json.dumps(ours))
        return 0
    command = [args.against, "--loans", str(args.loans), "--seed", str(args.seed)]
    try:
        done = subprocess.run(command, capture_output=True, text=True, check=False)
    except OSError as error:
        print(f"--against '{args.against}': cannot run it: {error.strerror}")
        return 1
    if done.returncode != 0:
        print(f"{' '.join(command)} exited {done.returncode}: {done.stderr.strip()}")
        return 1
    problems = compare(ours, json.loads(done.stdout))
    cases = len(ours["cases"])
    if problems:
        print(f"{len(problems)} differences between NumPy and {args.against}:")
        for p in problems:
            print("  " + p)
        print(f"0 passed, {cases} failed")
        return 1
    for name, values in ours["cases"].items():
        print(f"{name:>16}: {values['months']} months, cash flow {values['cash_flow']:.2f}, "
              f"loss {values['loss']:.2f}")
    print(f"{args.loans} loans: engine (1 and 2 threads, loan totals), tight loop and NumPy agree "
          f"to {TOLERANCE:g} relative in every pool total and monthly cash flow")
    print(f"{cases} passed, 0 failed")
    return 0


# ---- Benchmark -----------------------------------------------------------------------------------

def peak_rss_mib():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # Linux: KiB


def run_bench(args):
    cases = bench_cases()
    names = args.cases.split(",") if args.cases else list(cases)
    for name in names:
        if name not in cases:
            sys.exit(f"--cases '{name}': unknown; use {', '.join(cases)}")
    counts = [int(x) for x in args.loans_list.split(",")] if args.loans_list else [100000, 1000000]
    print(f"numpy {np.__version__}, python {sys.version.split()[0]}; best of {args.repeat}")
    print(f"{'case':>12} {'loans':>8} {'loan-months':>12} {'seconds':>8} {'loan-months/s':>14} "
          f"{'peak MiB':>9} {'cash flow total':>20} {'loss total':>16}")
    for count in counts:
        loans = fixed_loans(count, args.seed)
        for name in names:
            a = cases[name]
            best = None
            for _ in range(args.repeat):
                start = time.perf_counter()
                sums, months = project(loans, a)
                seconds = time.perf_counter() - start
                best = seconds if best is None else min(best, seconds)
            lm = loan_months(loans, a)
            print(f"{name:>12} {count:>8} {lm:>12} {best:>8.3f} {lm / best:>14.4g} "
                  f"{peak_rss_mib():>9.0f} {np.sum(sums['cash_flow']):>20.2f} "
                  f"{np.sum(sums['loss']):>16.2f}", flush=True)
    return 0


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--check", action="store_true",
                        help="print (or, with --against, compare) the cross-check pool totals")
    parser.add_argument("--against", metavar="PROGRAM",
                        help="with --check: the cashflow_check program to compare with")
    parser.add_argument("--loans", type=int, default=None,
                        help="loans: the cross-check pool's size (default 5000), or one "
                             "benchmark size")
    parser.add_argument("--loans-list", default=None,
                        help="benchmark sizes, comma-separated (default 100000,1000000)")
    parser.add_argument("--seed", type=int, default=SEED)
    parser.add_argument("--cases", default=None, help="benchmark cases, comma-separated")
    parser.add_argument("--repeat", type=int, default=1, help="benchmark runs per case; best kept")
    args = parser.parse_args()
    if args.against and not args.check:
        parser.error("--against needs --check")
    if args.check:
        args.loans = 5000 if args.loans is None else args.loans
        if args.loans < 3:
            parser.error("--loans must be at least 3 with --check (the hand-written loans)")
        return run_check(args)
    if args.loans is not None:
        args.loans_list = str(args.loans)
    if args.repeat < 1:
        parser.error("--repeat must be at least 1")
    return run_bench(args)


if __name__ == "__main__":
    sys.exit(main())
