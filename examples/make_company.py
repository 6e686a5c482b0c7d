"""Write the invented collaboration network of "Tessary Works", a made-up instrument maker.

Everything here is fiction: the company, the people (names built from random
syllables), the departments and the sites. Run ``python examples/make_company.py`` to
rewrite ``company_edges.csv`` and ``company_people.csv`` beside this file; the seed is
fixed, so the files come out the same every time.

Planted features, which the demo report should find:

- six departments that mostly work among themselves;
- two hubs: the Assembly lead ``Dorvel Kasimo`` and the Design lead ``Renna Xolatu``,
  each tied to most of their department;
- three bridges between departments: ``Tulo Brimesk`` (Design and Assembly),
  ``Sava Quintel`` (Sales and Logistics) and ``Mika Lorendai`` (Quality, Assembly and
  Finance);
- one single point of failure: the six-person field service crew at the Harbour site
  reaches the rest of the company only through its coordinator ``Fen Ostravik``.
"""

from __future__ import annotations

import csv
import random
from pathlib import Path

HERE = Path(__file__).resolve().parent
SEED = 7

DEPARTMENTS = {
    "Assembly": (48, "Hill site"),
    "Design": (34, "River site"),
    "Quality": (26, "Hill site"),
    "Sales": (30, "River site"),
    "Logistics": (28, "Harbour site"),
    "Finance": (20, "River site"),
}
SYLLABLES = [
    "ka",
    "lo",
    "mi",
    "ren",
    "tu",
    "sa",
    "vel",
    "dor",
    "bri",
    "na",
    "xo",
    "fe",
    "quin",
    "zal",
    "ori",
    "mes",
    "ta",
    "vo",
    "li",
    "sen",
    "ku",
    "ra",
    "pel",
    "ni",
    "the",
    "ola",
]


def _name(rng: random.Random, taken: set[str]) -> str:
    while True:
        first = "".join(rng.choice(SYLLABLES) for _ in range(2)).capitalize()
        last = "".join(rng.choice(SYLLABLES) for _ in range(3)).capitalize()
        name = f"{first} {last}"
        if name not in taken:
            taken.add(name)
            return name


def build() -> tuple[list[tuple[str, str, int]], list[dict[str, str]]]:
    rng = random.Random(SEED)
    taken = {
        "Dorvel Kasimo",
        "Renna Xolatu",
        "Tulo Brimesk",
        "Sava Quintel",
        "Mika Lorendai",
        "Fen Ostravik",
    }
    people: list[dict[str, str]] = []
    members: dict[str, list[str]] = {}
    for dept, (size, site) in DEPARTMENTS.items():
        names = [_name(rng, taken) for _ in range(size)]
        members[dept] = names
        for name in names:
            people.append({"node": name, "department": dept, "site": site})
    ties: dict[tuple[str, str], int] = {}

    def tie(a: str, b: str, weight: int) -> None:
        if a != b:
            key = (a, b) if a < b else (b, a)
            ties[key] = max(ties.get(key, 0), weight)

    # Within departments: dense, fairly strong collaboration.
    for names in members.values():
        for i, a in enumerate(names):
            for b in names[i + 1 :]:
                if rng.random() < 0.16:
                    tie(a, b, rng.randint(2, 12))
    # Across departments: rare, weak ties.
    everyone = [p["node"] for p in people]
    for _ in range(40):
        a, b = rng.sample(everyone, 2)
        tie(a, b, rng.randint(1, 3))

    # Planted hubs, each tied to most of their department.
    for hub, dept in (("Dorvel Kasimo", "Assembly"), ("Renna Xolatu", "Design")):
        people.append({"node": hub, "department": dept, "site": DEPARTMENTS[dept][1]})
        for b in rng.sample(members[dept], int(0.7 * len(members[dept]))):
            tie(hub, b, rng.randint(4, 15))
        members[dept].append(hub)
    # Planted bridges, each with solid ties into two or three departments.
    for bridge, home, others in (
        ("Tulo Brimesk", "Design", ["Assembly"]),
        ("Sava Quintel", "Sales", ["Logistics"]),
        ("Mika Lorendai", "Quality", ["Assembly", "Finance"]),
    ):
        people.append({"node": bridge, "department": home, "site": DEPARTMENTS[home][1]})
        for dept in [home, *others]:
            for b in rng.sample(members[dept], 7):
                tie(bridge, b, rng.randint(3, 9))
    # Planted single point of failure: a field crew reached only through its coordinator.
    coordinator = "Fen Ostravik"
    people.append({"node": coordinator, "department": "Logistics", "site": "Harbour site"})
    for b in rng.sample(members["Logistics"], 6):
        tie(coordinator, b, rng.randint(3, 10))
    crew = [_name(rng, taken) for _ in range(6)]
    for name in crew:
        people.append({"node": name, "department": "Field service", "site": "Harbour site"})
        tie(coordinator, name, rng.randint(5, 14))
    for i, a in enumerate(crew):
        for b in crew[i + 1 :]:
            if rng.random() < 0.5:
                tie(a, b, rng.randint(2, 8))
    edges = [(a, b, w) for (a, b), w in sorted(ties.items())]
    return edges, people


def write(edges: list, people: list[dict[str, str]], stem: str) -> None:
    """Write ``STEM_edges.csv`` and ``STEM_people.csv`` beside this file."""
    with open(HERE / f"{stem}_edges.csv", "w", newline="", encoding="utf-8") as fh:
        out = csv.writer(fh)
        out.writerow(["source", "target", "weight"])
        out.writerows(edges)
    with open(HERE / f"{stem}_people.csv", "w", newline="", encoding="utf-8") as fh:
        out = csv.DictWriter(fh, fieldnames=["node", "department", "site"])
        out.writeheader()
        out.writerows(people)
    print(f"{len(people)} people, {len(edges)} ties")


def main() -> None:
    write(*build(), "company")


if __name__ == "__main__":
    main()
