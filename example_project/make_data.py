"""Generate the invented data of the example study (a collaborative of five community clinics).

What this script does
---------------------
It writes five CSV files under ``data/``; every name, clinic and number in them is invented:

* ``data/staff.csv``      the staff roster (node list): id, name, clinic, role, years_in_post.
                          60 staff in five clinics; each clinic has one manager. One name holds a
                          comma and one a non-ASCII letter, so CSV quoting and UTF-8 get exercised.
* ``data/advice.csv``     a directed, weighted advice network: source seeks advice from target,
                          ``times_per_month`` times (1-12). Ties stay mostly inside a clinic and lean
                          toward long-serving staff, physicians and managers; managers and a few
                          brokers (pharmacists covering two clinics, a senior physician, a senior
                          community health worker) carry the ties between clinics. Two staff have
                          no advice ties at all (isolates).
* ``data/coworking.csv``  an undirected, unweighted co-working network among the same staff,
                          clustered by clinic, with a few ties from joint projects across clinics.
* ``data/staff_wave2.csv`` and ``data/advice_wave2.csv``  the roster and the advice network a year
                          later, after the Larkmoor and Quayside teams merged into one team (the
                          ``team`` column): most ties of the first wave are kept, many new ties
                          join the two merged clinics, three staff have left and two have joined.
* ``data/attendance.csv`` a two-mode network: which staff attended which of twelve invented
                          training sessions (s01-s12); ``data/training_nodes.csv`` is its node
                          list, staff and sessions, with a ``mode`` column since the two share
                          ids such as "s01".

The advice file also carries, on purpose, the kind of faults real survey exports have, so that
``netfolio check`` has something to find and report:

* three repeated ties: a (source, target) pair that appears a second time with another count;
* one self-loop (a respondent who named themself);
* one tie from ``s61``, a new hire who answered the survey but is not yet on the roster (in both
  the advice and the co-working network).

There are no missing or negative counts (those would be errors, not fixes). The script prints the
line number (header = line 1) of every deliberate fault.

Run it from anywhere with ``python make_data.py``; it uses only the standard library, numpy and
pandas, and a fixed seed, so it writes the same files every time. Its seed is unrelated to the
``seed`` in study.toml.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

SEED = 20607
HERE = Path(__file__).resolve().parent
DATA = HERE / "data"

# Five invented clinics and the roles each one employs, in roster order.
CLINICS: dict[str, list[tuple[str, int]]] = {
    "Alderbrook": [("manager", 1), ("physician", 3), ("nurse", 5),
                   ("community health worker", 2), ("pharmacist", 1), ("administrator", 2)],
    "Stonewick": [("manager", 1), ("physician", 3), ("nurse", 5),
                  ("community health worker", 2), ("administrator", 2)],
    "Fernhollow": [("manager", 1), ("physician", 2), ("nurse", 5),
                   ("community health worker", 2), ("pharmacist", 1), ("administrator", 1)],
    "Larkmoor": [("manager", 1), ("physician", 2), ("nurse", 4),
                 ("community health worker", 2), ("administrator", 2)],
    "Quayside": [("manager", 1), ("physician", 2), ("nurse", 3),
                 ("community health worker", 2), ("pharmacist", 1), ("administrator", 1)],
}

# Years in post: (low, high) inclusive, per role.
YEARS = {
    "manager": (8, 25), "physician": (3, 28), "nurse": (0, 30),
    "community health worker": (0, 14), "pharmacist": (2, 20), "administrator": (0, 18),
}

# Common first names and invented surnames built from syllables.
FIRST = [
    "Anna", "Ben", "Carla", "Daniel", "Elena", "Farah", "George", "Hana", "Ivan", "Julia",
    "Kofi", "Lena", "Marco", "Nadia", "Omar", "Priya", "Rosa", "Samuel", "Tara", "Victor",
    "Wendy", "Yusuf", "Amira", "Bruno", "Chloe", "Dmitri", "Esther", "Felix", "Grace", "Hugo",
    "Irene", "Jonah", "Keiko", "Leo", "Maya", "Nikhil", "Olga", "Paolo", "Ruth", "Sofia",
    "Tomas", "Uma", "Vera", "Will", "Xenia", "Yara", "Adam", "Bea", "Cyrus", "Dora",
    "Emil", "Fatima", "Gita", "Henry", "Ines", "Jakob", "Kira", "Lucas", "Mira", "Noah",
]
SURNAME_HEAD = ["Brem", "Calder", "Dun", "Fen", "Garr", "Holm", "Kest", "Lind", "Morr", "Pell",
                "Renn", "Sel", "Torr", "Wend", "Yarr", "Ash", "Quill", "Orm"]
SURNAME_TAIL = ["abey", "icott", "away", "ingdale", "ock", "amere", "ister", "wick", "oby",
                "enshaw"]

# Two names written by hand, to exercise CSV quoting and UTF-8.
COMMA_NAME = "Brennick, Tamsin"          # roster export lists this person surname-first
ACCENT_NAME = "Zoë Marrowby"

SENIOR_ROLES = {"physician": 2.0, "manager": 1.6, "pharmacist": 1.0, "nurse": 0.5,
                "community health worker": 0.25, "administrator": 0.25}


def invent_names(rng: np.random.Generator, count: int) -> list[str]:
    surnames = sorted({h + t for h in SURNAME_HEAD for t in SURNAME_TAIL})
    firsts = list(FIRST)
    rng.shuffle(firsts)
    picked = rng.choice(len(surnames), size=count, replace=False)
    return [f"{firsts[i]} {surnames[j]}" for i, j in enumerate(picked)]


def make_staff(rng: np.random.Generator) -> pd.DataFrame:
    rows = []
    for clinic, roles in CLINICS.items():
        for role, count in roles:
            for _ in range(count):
                low, high = YEARS[role]
                rows.append({"clinic": clinic, "role": role,
                             "years_in_post": int(rng.integers(low, high + 1))})
    staff = pd.DataFrame(rows)
    names = invent_names(rng, len(staff))
    # The hand-written names go to a Larkmoor nurse and a Fernhollow physician.
    names[staff.index[(staff.clinic == "Larkmoor") & (staff.role == "nurse")][1]] = COMMA_NAME
    names[staff.index[(staff.clinic == "Fernhollow") & (staff.role == "physician")][0]] = ACCENT_NAME
    staff["name"] = names
    # Ids follow a shuffled roster, so they do not line up with clinics.
    order = rng.permutation(len(staff))
    staff["id"] = [f"s{k + 1:02d}" for k in np.argsort(order)]
    staff = staff.sort_values("id").reset_index(drop=True)
    return staff[["id", "name", "clinic", "role", "years_in_post"]]


def pick_isolates(staff: pd.DataFrame) -> list[str]:
    """A part-time evening administrator and an outreach worker who is mostly off-site."""
    admin = staff[(staff.clinic == "Stonewick") & (staff.role == "administrator")]
    admin_id = admin.sort_values("id").id.iloc[-1]
    chw = staff[(staff.clinic == "Quayside") & (staff.role == "community health worker")]
    return [admin_id, chw.sort_values("id").id.iloc[-1]]


def count(rng: np.random.Generator, mean: float) -> int:
    return int(min(12, 1 + rng.poisson(mean - 1)))


def make_advice(rng: np.random.Generator, staff: pd.DataFrame, isolates: list[str]) -> pd.DataFrame:
    active = staff[~staff.id.isin(isolates)].set_index("id")
    ties: dict[tuple[str, str], int] = {}

    def add(src: str, dst: str, times: int) -> None:
        if src != dst and (src, dst) not in ties:
            ties[(src, dst)] = times

    out_range = {"nurse": (3, 7), "physician": (3, 5), "manager": (3, 5),
                 "community health worker": (3, 5), "pharmacist": (3, 5), "administrator": (2, 4)}
    # Within each clinic: advice leans toward seniority and clinical/managerial roles.
    for ego, row in active.iterrows():
        mates = active[(active.clinic == row.clinic) & (active.index != ego)]
        weight = np.array([0.4 + m.years_in_post / 8 + SENIOR_ROLES[m.role]
                           for _, m in mates.iterrows()])
        low, high = out_range[row.role]
        k = min(len(mates), int(rng.integers(low, high + 1)))
        for alter in rng.choice(mates.index.to_numpy(), size=k, replace=False, p=weight / weight.sum()):
            mean = 3.5 + (1.5 if active.loc[alter, "role"] in ("physician", "manager") else 0)
            add(ego, str(alter), count(rng, mean))

    managers = active[active.role == "manager"]
    # Managers consult two other clinics' managers.
    for ego in managers.index:
        others = managers.index[managers.index != ego].to_numpy()
        for alter in rng.choice(others, size=2, replace=False):
            add(ego, str(alter), count(rng, 2))
    # Clinics without a pharmacist ask the pharmacists who cover them.
    pharm = active[active.role == "pharmacist"]
    cover = {"Stonewick": pharm[pharm.clinic == "Alderbrook"].index[0],
             "Larkmoor": pharm[pharm.clinic == "Fernhollow"].index[0]}
    for clinic, pharmacist in cover.items():
        askers = active[(active.clinic == clinic) & active.role.isin(["nurse", "physician"])]
        for ego in rng.choice(askers.index.to_numpy(), size=3, replace=False):
            add(str(ego), pharmacist, count(rng, 2.5))
    # The longest-serving physician is consulted by one physician from each other clinic.
    phys = active[active.role == "physician"].sort_values(["years_in_post", "id"], ascending=[False, True])
    lead = phys.index[0]
    for clinic in CLINICS:
        if clinic != active.loc[lead, "clinic"]:
            add(str(rng.choice(phys[phys.clinic == clinic].index.to_numpy())), lead, count(rng, 2))
    # The most senior community health worker advises outreach colleagues elsewhere.
    chw = active[active.role == "community health worker"].sort_values(
        ["years_in_post", "id"], ascending=[False, True])
    senior_chw = chw.index[0]
    others = chw[chw.clinic != active.loc[senior_chw, "clinic"]].index.to_numpy()
    for ego in rng.choice(others, size=3, replace=False):
        add(str(ego), senior_chw, count(rng, 2))
    # A little cross-clinic noise.
    ids = active.index.to_numpy()
    while sum(active.loc[s, "clinic"] != active.loc[t, "clinic"] for s, t in ties) < 30:
        s, t = rng.choice(ids, size=2, replace=False)
        if active.loc[s, "clinic"] != active.loc[t, "clinic"]:
            add(str(s), str(t), 1)

    return pd.DataFrame([(s, t, w) for (s, t), w in sorted(ties.items())],
                        columns=["source", "target", "times_per_month"])


def add_faults(rng: np.random.Generator, clean: pd.DataFrame, staff: pd.DataFrame,
               isolates: list[str]) -> tuple[pd.DataFrame, list[tuple[str, dict]]]:
    """Insert the deliberate faults; return the file rows and (kind, row) for each fault."""
    rows = clean.to_dict("records")
    faults: list[tuple[str, dict]] = []
    # Three respondents named one alter twice (another count): the repeat follows their block.
    sources = sorted(set(clean.source))
    for src in [sources[5], sources[23], sources[41]]:
        block = [i for i, r in enumerate(rows) if r["source"] == src]
        first = rows[block[1]]
        repeat = {"source": src, "target": first["target"],
                  "times_per_month": first["times_per_month"] % 12 + 1}
        rows.insert(block[-1] + 1, repeat)
        faults.append(("repeated tie", repeat))
    # One respondent named themself.
    src = sources[37]
    block = [i for i, r in enumerate(rows) if r["source"] == src]
    loop = {"source": src, "target": src, "times_per_month": 2}
    rows.insert(block[2], loop)
    faults.append(("self-loop", loop))
    # A new hire not yet on the roster answered the survey (asks the clinic manager).
    manager = staff[(staff.clinic == "Alderbrook") & (staff.role == "manager")].id.iloc[0]
    stranger = {"source": "s61", "target": manager, "times_per_month": 4}
    rows.append(stranger)
    faults.append(("unknown id", stranger))
    for _, r in faults:
        assert not {r["source"], r["target"]} & set(isolates)
    return pd.DataFrame(rows, columns=clean.columns), faults


def make_coworking(rng: np.random.Generator, staff: pd.DataFrame) -> pd.DataFrame:
    s = staff.set_index("id")
    pairs: set[frozenset[str]] = set()
    ids = s.index.tolist()
    for i, a in enumerate(ids):
        for b in ids[i + 1:]:
            if s.loc[a, "clinic"] != s.loc[b, "clinic"]:
                continue
            roles = {s.loc[a, "role"], s.loc[b, "role"]}
            p = 0.36
            if roles == {"nurse", "physician"} or roles == {"community health worker"}:
                p += 0.25
            if roles == {"manager", "administrator"} or roles == {"administrator"}:
                p += 0.45
            if roles == {"nurse"}:
                p += 0.15
            if rng.random() < p:
                pairs.add(frozenset((a, b)))
    # Cross-clinic joint work: an outreach project team and pharmacy cover.
    team = [str(rng.choice(s.index[(s.clinic == c) & (s.role == "community health worker")].to_numpy()))
            for c in CLINICS]
    team.append(s.index[(s.clinic == "Fernhollow") & (s.role == "pharmacist")][0])
    for i, a in enumerate(team):
        for b in rng.choice([t for t in team if t != a], size=2, replace=False):
            pairs.add(frozenset((a, str(b))))
    managers = s.index[s.role == "manager"].tolist()
    for i, a in enumerate(managers):
        pairs.add(frozenset((a, managers[(i + 1) % len(managers)])))
    for pharmacy, clinic in (("Alderbrook", "Stonewick"), ("Fernhollow", "Larkmoor")):
        ph = s.index[(s.clinic == pharmacy) & (s.role == "pharmacist")][0]
        for b in rng.choice(s.index[(s.clinic == clinic) & (s.role == "nurse")].to_numpy(), size=2,
                            replace=False):
            pairs.add(frozenset((ph, str(b))))
    # Nobody works alone: anyone left without a tie works with their clinic manager.
    for a in ids:
        if not any(a in p for p in pairs):
            pairs.add(frozenset((a, s.index[(s.clinic == s.loc[a, "clinic"]) & (s.role == "manager")][0])))
    rows = []
    for p in sorted(sorted(p) for p in pairs):
        a, b = p
        rows.append((a, b) if rng.random() < 0.5 else (b, a))  # survey order, not id order
    return pd.DataFrame(rows, columns=["source", "target"])


WAVE2_SEED = 31177  # the second wave draws from its own generator: the first wave stays as it was
MERGED = ("Larkmoor", "Quayside")
MERGED_TEAM = "Larkmoor-Quayside"


def make_wave2(staff: pd.DataFrame, clean: pd.DataFrame) -> tuple[pd.DataFrame, pd.DataFrame]:
    """The roster and advice ties of the second wave (see the module's docstring)."""
    rng = np.random.default_rng(WAVE2_SEED)
    # Leavers: a Stonewick nurse, an Alderbrook administrator and a Fernhollow nurse.
    leavers = [staff[(staff.clinic == clinic) & (staff.role == role)].id.iloc[0]
               for clinic, role in (("Stonewick", "nurse"), ("Alderbrook", "administrator"),
                                    ("Fernhollow", "nurse"))]
    roster = staff[~staff.id.isin(leavers)].copy()
    joiners = pd.DataFrame([
        {"id": "s62", "name": "Rhea Ormwick", "clinic": "Quayside", "role": "nurse",
         "years_in_post": 0},
        {"id": "s63", "name": "Tobias Fenoby", "clinic": "Larkmoor", "role": "administrator",
         "years_in_post": 0}])
    roster = pd.concat([roster, joiners], ignore_index=True)
    roster["team"] = [MERGED_TEAM if c in MERGED else c for c in roster.clinic]
    present = set(roster.id)
    ties: dict[tuple[str, str], int] = {}
    for row in clean.itertuples(index=False):
        if row.source in present and row.target in present and rng.random() < 0.8:
            ties[(row.source, row.target)] = int(min(12, max(1, row.times_per_month
                                                             + rng.integers(-1, 2))))
    merged = roster[roster.clinic.isin(MERGED)].set_index("id")
    for ego, person in merged.iterrows():
        other = merged[merged.clinic != person.clinic].index.to_numpy()
        for alter in rng.choice(other, size=min(3, len(other)), replace=False):
            ties.setdefault((str(ego), str(alter)), int(1 + rng.poisson(2)))
    for joiner in joiners.id:
        mates = merged.index[merged.index != joiner].to_numpy()
        for alter in rng.choice(mates, size=4, replace=False):
            ties.setdefault((joiner, str(alter)), int(1 + rng.poisson(2)))
        for ego in rng.choice(mates, size=2, replace=False):
            ties.setdefault((str(ego), joiner), 1)
    advice = pd.DataFrame([(s, t, w) for (s, t), w in sorted(ties.items())],
                          columns=["source", "target", "times_per_month"])
    return roster.sort_values("id").reset_index(drop=True), advice


SESSION_TOPICS = (  # invented training sessions: (id, topic, host clinic or None for all)
    ("s01", "triage refresher", None), ("s02", "medication safety", None),
    ("s03", "records system", "Stonewick"), ("s04", "records system", "Fernhollow"),
    ("s05", "records system", "Larkmoor"), ("s06", "infection control", None),
    ("s07", "home visits", "Stonewick"), ("s08", "home visits", "Fernhollow"),
    ("s09", "language access", None), ("s10", "managers' forum", None),
    ("s11", "diabetes care", "Larkmoor"), ("s12", "first aid", None),
)


def make_training(rng: np.random.Generator, staff: pd.DataFrame) -> tuple[pd.DataFrame, pd.DataFrame]:
    """A two-mode attendance file (staff x training session) and its node list, with a mode
    column because staff and sessions share ids such as "s01". A session for one clinic draws
    mostly its staff; the managers' forum draws managers; open sessions draw anyone."""
    rows = []
    for session, topic, host in SESSION_TOPICS:
        for person in staff.itertuples():
            if topic == "managers' forum":
                chance = 0.9 if person.role == "manager" else 0.03
            elif host is not None:
                chance = 0.55 if person.clinic == host else 0.04
            else:
                chance = 0.22
            if rng.random() < chance:
                rows.append((person.id, session))
    attendance = pd.DataFrame(rows, columns=["staff", "session"])
    people = staff[["id", "name", "clinic", "role"]].assign(mode="staff", topic="")
    sessions = pd.DataFrame([{"id": s, "name": f"{topic} ({s})", "clinic": host or "",
                              "role": "", "mode": "session", "topic": topic}
                             for s, topic, host in SESSION_TOPICS])
    nodes = pd.concat([people, sessions])[["id", "mode", "name", "clinic", "role", "topic"]]
    return attendance, nodes


def main() -> None:
    rng = np.random.default_rng(SEED)
    staff = make_staff(rng)
    isolates = pick_isolates(staff)
    clean = make_advice(rng, staff, isolates)
    advice, faults = add_faults(rng, clean, staff, isolates)
    coworking = make_coworking(rng, staff)
    # The new hire also named a co-worker, the manager they ask for advice: both networks then
    # hold the same 61 people, so the [[relations]] table can compare them tie by tie.
    new_hire = next(r for kind, r in faults if kind == "unknown id")
    coworking = pd.concat([coworking, pd.DataFrame([{"source": new_hire["source"],
                                                     "target": new_hire["target"]}])],
                          ignore_index=True)

    DATA.mkdir(exist_ok=True)
    options = {"index": False, "encoding": "utf-8", "lineterminator": "\n"}
    staff.to_csv(DATA / "staff.csv", **options)
    advice.to_csv(DATA / "advice.csv", **options)
    coworking.to_csv(DATA / "coworking.csv", **options)
    roster2, advice2 = make_wave2(staff, clean)
    roster2.to_csv(DATA / "staff_wave2.csv", **options)
    advice2.to_csv(DATA / "advice_wave2.csv", **options)
    # Its own generator, so the files above stay as they were before the training data.
    attendance, training_nodes = make_training(np.random.default_rng(SEED + 1), staff)
    attendance.to_csv(DATA / "attendance.csv", **options)
    training_nodes.to_csv(DATA / "training_nodes.csv", **options)

    print(f"staff.csv: {len(staff)} staff; advice isolates: {', '.join(isolates)}")
    print(f"advice.csv: {len(advice)} rows ({len(clean)} distinct clean ties)")
    print(f"coworking.csv: {len(coworking)} ties")
    print(f"staff_wave2.csv: {len(roster2)} staff; advice_wave2.csv: {len(advice2)} ties")
    print(f"attendance.csv: {len(attendance)} attendances of {len(SESSION_TOPICS)} sessions")
    records = advice.to_dict("records")
    for kind, row in faults:
        lines = [i + 2 for i, r in enumerate(records)
                 if (r["source"], r["target"]) == (row["source"], row["target"])]
        print(f"  {kind}: {row['source']} -> {row['target']} on line(s) {', '.join(map(str, lines))}")


if __name__ == "__main__":
    main()
