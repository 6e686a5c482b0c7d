"""Write "Tessary Works" a year on: the invented company of ``make_company.py``, changed.

Everything here is fiction, like the first snapshot. Run
``python examples/make_company_year.py`` to rewrite ``company_year_edges.csv`` and
``company_year_people.csv`` beside this file; the seeds are fixed, so the files come out
the same every time.

Planted changes, which the change report should find:

- Design was reorganised into two departments, "Product design" (with its lead
  ``Renna Xolatu`` and the bridge ``Tulo Brimesk``) and "Control software": the ties
  between the two halves mostly ended and each half works more closely within itself
  (a splitting);
- the Sales-Logistics bridge ``Sava Quintel`` left the company;
- eight people were hired into Assembly (a growth);
- four people left Quality (a contraction);
- a few ties across the company ended and a few began, as they do in any year (none
  of the field crew's: it is still reached only through ``Fen Ostravik``).
"""

from __future__ import annotations

import random
from pathlib import Path

from make_company import _name, build, write

HERE = Path(__file__).resolve().parent
SEED = 2027

HIRES = 8
QUALITY_LEAVERS = 4
LEAVING_BRIDGE = "Sava Quintel"


def build_year() -> tuple[list[tuple[str, str, int]], list[dict[str, str]]]:
    edges, people = build()
    rng = random.Random(SEED)
    taken = {p["node"] for p in people}
    dept = {p["node"]: p["department"] for p in people}
    ties = {(a, b): w for a, b, w in edges}

    def tie(a: str, b: str, weight: int) -> None:
        if a != b:
            key = (a, b) if a < b else (b, a)
            ties[key] = max(ties.get(key, 0), weight)

    # Design split in two halves: the planted lead and bridge stay in Product design.
    design = sorted(n for n, d in dept.items() if d == "Design")
    keep = {"Renna Xolatu", "Tulo Brimesk"}
    others = [n for n in design if n not in keep]
    rng.shuffle(others)
    half = len(others) // 2
    product = set(others[:half]) | keep
    software = set(others[half:])
    for name in product:
        dept[name] = "Product design"
    for name in software:
        dept[name] = "Control software"
    across = [k for k in ties if {k[0], k[1]} & product and {k[0], k[1]} & software]
    for key in across:
        if rng.random() < 0.9:  # most working ties across the new line end
            del ties[key]
    for group in (sorted(product), sorted(software)):
        for i, a in enumerate(group):
            for b in group[i + 1 :]:
                if rng.random() < 0.15:
                    tie(a, b, rng.randint(2, 10))

    # The bridge between Sales and Logistics left.
    leavers = {LEAVING_BRIDGE}
    # Four of Quality left (not its planted bridge).
    quality = sorted(n for n, d in dept.items() if d == "Quality" and n != "Mika Lorendai")
    leavers.update(rng.sample(quality, QUALITY_LEAVERS))
    ties = {k: w for k, w in ties.items() if not ({k[0], k[1]} & leavers)}

    # Eight hires in Assembly, each working with five to eight colleagues there.
    assembly = sorted(n for n, d in dept.items() if d == "Assembly")
    hires = [_name(rng, taken) for _ in range(HIRES)]
    for name in hires:
        dept[name] = "Assembly"
        for b in rng.sample(assembly, rng.randint(5, 8)):
            tie(name, b, rng.randint(2, 8))
    for i, a in enumerate(hires):
        for b in hires[i + 1 :]:
            if rng.random() < 0.3:
                tie(a, b, rng.randint(2, 6))

    # Ordinary churn: a few weak cross-department ties end, a few begin.
    weak = sorted(k for k, w in ties.items() if w <= 3 and dept[k[0]] != dept[k[1]])
    for key in rng.sample(weak, min(8, len(weak))):
        del ties[key]
    # (the field crew keeps its single route through its coordinator)
    crew = {n for n, d in dept.items() if d == "Field service"} | {"Fen Ostravik"}
    everyone = sorted(n for n in dept if n not in leavers | crew)
    for _ in range(8):
        a, b = rng.sample(everyone, 2)
        tie(a, b, rng.randint(1, 3))

    site = {p["node"]: p["site"] for p in people}
    site.update(dict.fromkeys(hires, "Hill site"))
    year_people = [
        {"node": n, "department": dept[n], "site": site[n]}
        for n in [p["node"] for p in people] + hires
        if n not in leavers
    ]
    return [(a, b, w) for (a, b), w in sorted(ties.items())], year_people


def main() -> None:
    write(*build_year(), "company_year")


if __name__ == "__main__":
    main()
