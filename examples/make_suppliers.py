"""Write the invented supplier network of "Calder Motive", a made-up maker of e-bikes.

Every firm and region here is fiction: firm names are built from random syllables.
Ties point from supplier to customer; the weight is the share of the customer's
purchases (in percent) that the tie carries. Run ``python examples/make_suppliers.py``
to rewrite ``suppliers_edges.csv`` and ``suppliers_firms.csv`` beside this file.

Five tiers: raw-material firms (tier 4) feed component makers (tier 3), which feed
sub-assembly makers (tier 2), which feed system suppliers (tier 1), which feed Calder
Motive's three plants (tier 0). Most firms buy from two or more suppliers.

Planted single-source chokepoints, which the demo report should find:

- ``Varnholt Castings`` (tier 3) is the only supplier of four sub-assembly makers;
- ``Quessa Polymers`` (tier 4) is the only supplier of three component makers, one
  of which is in turn the only supplier of a sub-assembly maker;
- ``Ilmarin Drives`` (tier 1) is the only supplier of the Southfold plant's drive
  line: the plant itself buys from others, but two tier-0 assembly cells depend on it.
"""

from __future__ import annotations

import csv
import random
from pathlib import Path

HERE = Path(__file__).resolve().parent
SEED = 11

TIERS = {4: 110, 3: 80, 2: 50, 1: 22}
REGIONS = ["North region", "East region", "South region", "West region"]
PARTS = {
    4: ["Metals", "Polymers", "Chemicals", "Minerals", "Fibres"],
    3: ["Castings", "Fasteners", "Moulding", "Wiring", "Bearings"],
    2: ["Assemblies", "Modules", "Frames", "Harnesses"],
    1: ["Systems", "Drives", "Electronics", "Cockpits"],
}
SYLLABLES = [
    "var",
    "nol",
    "quess",
    "ilm",
    "ar",
    "in",
    "dra",
    "ko",
    "bel",
    "tor",
    "ven",
    "sa",
    "mor",
    "lu",
    "ost",
    "ra",
    "hal",
    "ce",
    "dun",
    "ri",
    "ve",
    "pa",
]


def _firm(rng: random.Random, tier: int, taken: set[str]) -> str:
    while True:
        stem = "".join(rng.choice(SYLLABLES) for _ in range(2)).capitalize()
        name = f"{stem} {rng.choice(PARTS[tier])}"
        if name not in taken:
            taken.add(name)
            return name


def build() -> tuple[list[tuple[str, str, int]], list[dict[str, str]]]:
    rng = random.Random(SEED)
    planted = {"Varnholt Castings": 3, "Quessa Polymers": 4, "Ilmarin Drives": 1}
    taken = set(planted)
    tiers: dict[int, list[str]] = {}
    firms: list[dict[str, str]] = []
    for tier, count in TIERS.items():
        names = [_firm(rng, tier, taken) for _ in range(count)]
        names += [n for n, t in planted.items() if t == tier]
        tiers[tier] = names
        for n in names:
            firms.append({"node": n, "tier": str(tier), "region": rng.choice(REGIONS)})
    plants = [
        "Calder Motive Southfold plant",
        "Calder Motive Eastmere plant",
        "Calder Motive Wyle plant",
    ]
    cells = ["Calder Motive Southfold drive cell A", "Calder Motive Southfold drive cell B"]
    tiers[0] = plants
    for n in plants + cells:
        firms.append({"node": n, "tier": "0", "region": "Home region"})

    edges: dict[tuple[str, str], int] = {}
    sole: dict[str, str] = {}  # customer -> its one planted supplier

    # Planted sole-source customers.
    for customer in rng.sample([n for n in tiers[2] if n not in planted], 4):
        sole[customer] = "Varnholt Castings"
    quessa_customers = rng.sample([n for n in tiers[3] if n not in planted], 3)
    for customer in quessa_customers:
        sole[customer] = "Quessa Polymers"
    downstream = [n for n in tiers[2] if n not in planted and n not in sole][0]
    sole[downstream] = quessa_customers[0]
    for cell in cells:
        sole[cell] = "Ilmarin Drives"

    for tier in (3, 2, 1, 0):
        customers = tiers[tier] if tier else plants
        for customer in customers:
            if customer in sole:
                continue
            pool = [n for n in tiers[tier + 1] if n not in planted]
            for s in rng.sample(pool, rng.randint(2, 4)):
                edges[(s, customer)] = rng.randint(10, 60)
    for customer, supplier in sole.items():
        edges[(supplier, customer)] = 100
    # Planted firms also sell to ordinary customers, so they are not obscure.
    for firm, tier in planted.items():
        pool = tiers[tier - 1] if tier > 1 else plants
        for customer in rng.sample([c for c in pool if c not in sole], 2):
            edges[(firm, customer)] = rng.randint(10, 40)
    # The drive cells deliver to their plant.
    for cell in cells:
        edges[(cell, plants[0])] = 30
    # Every raw-material firm that sells nothing yet sells to someone.
    sellers = {s for s, _ in edges}
    for firm in tiers[4]:
        if firm not in sellers:
            customer = rng.choice([c for c in tiers[3] if c not in sole])
            edges[(firm, customer)] = rng.randint(5, 20)
    rows = [(s, t, w) for (s, t), w in sorted(edges.items())]
    return rows, firms


def main() -> None:
    edges, firms = build()
    with open(HERE / "suppliers_edges.csv", "w", newline="", encoding="utf-8") as fh:
        out = csv.writer(fh)
        out.writerow(["source", "target", "weight"])
        out.writerows(edges)
    with open(HERE / "suppliers_firms.csv", "w", newline="", encoding="utf-8") as fh:
        out = csv.DictWriter(fh, fieldnames=["node", "tier", "region"])
        out.writeheader()
        out.writerows(firms)
    print(f"{len(firms)} firms, {len(edges)} supply ties")


if __name__ == "__main__":
    main()
