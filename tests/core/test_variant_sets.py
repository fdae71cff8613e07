"""The cluster-randomised and crossover question sets on every reachable answer path.

The expected behaviour here is written independently of the data files: each domain's
questions, the condition under which each is asked and its algorithm are hand-written Python
below, and compared with what robtui computes from signalling_questions/rob2-cluster.toml and
rob2-crossover.toml over every reachable answer path, and with answers to questions off the
path added (every combination where a domain has at most 20,000; otherwise each path with its
off-path questions filled in every option). The parallel set is checked with the same
functions where it shares a domain, as a cross-check of both.

Sources, tagged as in the data files' headers (signalling_questions/README.md lists every row):
  [T3]  PubMed Central PMC10245087, Table 3: a published reproduction of the completed 2021
        RoB 2 CRT template (questions 1a.1-1a.3, 1b.1-1b.3, 2.1a-2.6 with their conditions).
  [R19] RoB 2 of 22 August 2019 (Sterne JAC et al. BMJ 2019;366:l4898; template and
        algorithms), as in tests/core/test_algorithm.py.
  [H23] Cochrane Handbook v6 (2019), chapter 23 (Higgins JPT, Eldridge S, Li T): the variants
        and the concerns of their extra domains.
  [E09] Eldridge S, Kerry S, Torgerson DJ. BMJ 2009;339:b4006 (identifying and recruiting
        participants in cluster randomised trials).
  [MEM] From memory, or our own reasoning: every algorithm row specific to a variant (the
        variants' flowcharts could not be read), domain S entirely, and the cluster questions
        3.1a, 3.1b, 4.3a and 4.3b.
"""

from __future__ import annotations

import itertools
from collections.abc import Callable, Iterator
from dataclasses import dataclass

import pytest

from robtui.core.algorithm import judge_domain, propose_all
from robtui.core.question_paths import answer_paths
from robtui.store.question_sets import available_question_sets, builtin_question_set

LOW, SOME, HIGH = "low", "some_concerns", "high"
ANY5 = ("Y", "PY", "PN", "N", "NI")
ANY6 = ("NA", *ANY5)
NO_NI = ("Y", "PY", "PN", "N")  # 3.2 offers no NI (RoB 2 template)
Answers = dict[str, str]


def yes(code: str | None) -> bool:
    return code in ("Y", "PY")


def no(code: str | None) -> bool:
    return code in ("N", "PN")


def yes_or_ni(code: str | None) -> bool:
    return code in ("Y", "PY", "NI")


def no_or_ni(code: str | None) -> bool:
    return code in ("N", "PN", "NI")


def always(_: Answers) -> bool:
    return True


@dataclass(frozen=True)
class Q:
    id: str
    options: tuple[str, ...]
    asked: Callable[[Answers], bool] = always


@dataclass(frozen=True)
class Spec:
    """A domain as published: its questions in order and its algorithm."""

    questions: tuple[Q, ...]
    judge: Callable[[Answers], str]
    paths: int  # number of reachable answer paths, counted by hand (see the comments)


def walk(spec: Spec) -> Iterator[Answers]:
    """Every answer path a reviewer can take, from the hand-written conditions."""

    def step(i: int, answers: Answers) -> Iterator[Answers]:
        if i == len(spec.questions):
            yield dict(answers)
            return
        q = spec.questions[i]
        if not q.asked(answers):
            yield from step(i + 1, answers)
            return
        for code in q.options:
            answers[q.id] = code
            yield from step(i + 1, answers)
            del answers[q.id]

    yield from step(0, {})


def least_favourable(*parts: str) -> str:
    if HIGH in parts:
        return HIGH
    return LOW if all(p == LOW for p in parts) else SOME


# --- Domain 1, randomisation (cluster 1a; crossover and parallel 1) ----------------------------
# [R19]; that both variants keep it: [MEM]. Cluster questions 1a.1-1a.3: [T3].
def randomisation(a: Answers) -> str:
    if no(a["1.2"]):
        return HIGH
    if a["1.2"] == "NI":
        return HIGH if yes(a["1.3"]) else SOME
    if no(a["1.1"]):
        return SOME
    return SOME if yes(a["1.3"]) else LOW


RANDOMISATION = Spec((Q("1.1", ANY5), Q("1.2", ANY5), Q("1.3", ANY5)), randomisation, 125)


# --- Cluster domain 1b, timing of identification or recruitment (NEW) ------------------------
# Questions and the condition of 1b.2: [T3]. Algorithm: [MEM], our own rule, built like domain 1
# [R19] with 1b.2 in the place of concealment and 1b.3 in that of baseline differences, and
# recruitment before the clusters were allocated ([E09]'s remedy) as the concealed case:
#   1b.1 Y/PY: low, unless 1b.3 Y/PY (some concerns);
#   1b.2 Y/PY: high;  1b.2 N/PN: low, unless 1b.3 Y/PY (some concerns);
#   1b.2 NI: high when 1b.3 Y/PY, else some concerns.
def recruitment(a: Answers) -> str:
    imbalance = yes(a["1b.3"])
    if yes(a["1b.1"]):
        return SOME if imbalance else LOW
    if yes(a["1b.2"]):
        return HIGH
    if no(a["1b.2"]):
        return SOME if imbalance else LOW
    return HIGH if imbalance else SOME


RECRUITMENT = Spec(
    (
        Q("1b.1", ANY5),
        Q("1b.2", ANY5, lambda a: no_or_ni(a["1b.1"])),
        Q("1b.3", ANY5),
    ),
    recruitment,
    2 * 5 + 3 * 5 * 5,  # 1b.1 Y/PY then 1b.3; 1b.1 N/PN/NI then 1b.2 and 1b.3
)


# --- Domain 2, effect of assignment -----------------------------------------------------------
def _trial_context_part(aware: bool, a: Answers) -> str:
    """Part 1 after the awareness questions [R19]; the CRT variant keeps it [MEM]."""
    if not aware or no(a["2.3"]):
        return LOW
    if a["2.3"] == "NI":
        return SOME
    if no(a["2.4"]):
        return SOME
    return SOME if yes(a["2.5"]) else HIGH


def _analysis_part(a: Answers) -> str:
    if yes(a["2.6"]):
        return LOW
    return SOME if no(a["2.7"]) else HIGH


def assignment_parallel(a: Answers) -> str:
    aware = not (no(a["2.1"]) and no(a["2.2"]))
    return least_favourable(_trial_context_part(aware, a), _analysis_part(a))


def assignment_cluster(a: Answers) -> str:
    # Participants count as unaware when they did not know they were in a trial (2.1a N/PN:
    # 2.1b is then not asked [T3]) or did not know their assignment (2.1b N/PN). [MEM], forced by
    # the conditions [T3]: without 2.3 the path must end as [R19] ends 2.1 and 2.2 both N/PN.
    participants_aware = not (no(a["2.1a"]) or no(a.get("2.1b")))
    aware = participants_aware or not no(a["2.2"])
    return least_favourable(_trial_context_part(aware, a), _analysis_part(a))


def _deviation_chain(first: str, second: str) -> tuple[Q, ...]:
    return (
        Q("2.3", ANY5, lambda a: yes_or_ni(a.get(first)) or yes_or_ni(a["2.2"])),
        Q("2.4", ANY5, lambda a: yes(a.get("2.3"))),
        Q("2.5", ANY5, lambda a: yes_or_ni(a.get("2.4"))),
        Q("2.6", ANY5),
        Q("2.7", ANY5, lambda a: no_or_ni(a["2.6"])),
    )


# Part 1 chain once 2.3 is asked: 2 (N/PN) + 1 (NI) + 2 * (2 + 3 * 5) = 37; part 2: 2 + 3*2 + 3*3.
_CHAIN, _PART2 = 37, 17
ASSIGNMENT_PARALLEL = Spec(
    (Q("2.1", ANY5), Q("2.2", ANY5), *_deviation_chain("2.1", "2.2")),
    assignment_parallel,
    (4 + 21 * _CHAIN) * _PART2,
)
ASSIGNMENT_CLUSTER = Spec(
    (
        Q("2.1a", ANY5),
        Q("2.1b", ANY5, lambda a: yes_or_ni(a["2.1a"])),
        Q("2.2", ANY5),
        *_deviation_chain("2.1b", "2.2"),
    ),
    assignment_cluster,
    # 2.1a N/PN: 2.2 N/PN ends part 1 (2*2), 2.2 Y/PY/NI opens the chain (2*3*37);
    # 2.1a Y/PY/NI: as the parallel pair 2.1b x 2.2 (4 + 21*37) for each of 3 codes.
    (2 * 2 + 2 * 3 * _CHAIN + 3 * (4 + 21 * _CHAIN)) * _PART2,
)


# --- Domain 2, effect of adhering (same in all three sets) -------------------------------------
def adhering(a: Answers) -> str:
    balanced = (no(a["2.1"]) and no(a["2.2"])) or a.get("2.3") in ("NA", "Y", "PY")
    if balanced and a["2.4"] in ("NA", "N", "PN") and a["2.5"] in ("NA", "N", "PN"):
        return LOW
    return SOME if yes(a["2.6"]) else HIGH


ADHERING = Spec(
    (
        Q("2.1", ANY5),
        Q("2.2", ANY5),
        Q("2.3", ANY6, lambda a: yes_or_ni(a["2.1"]) or yes_or_ni(a["2.2"])),
        Q("2.4", ANY6),
        Q("2.5", ANY6),
        Q("2.6", ANY5, lambda a: no_or_ni(a.get("2.3")) or yes_or_ni(a["2.4"])
          or yes_or_ni(a["2.5"])),
    ),
    adhering,
    20988,  # counted by hand in tests/core/test_algorithm.py
)


# --- Domain 3, missing outcome data ------------------------------------------------------------
def _missingness(a: Answers) -> str:
    if yes(a["3.2"]) or no(a["3.3"]):
        return LOW
    return SOME if no(a["3.4"]) else HIGH


def missing_parallel(a: Answers) -> str:
    return LOW if yes(a["3.1"]) else _missingness(a)


def missing_cluster(a: Answers) -> str:
    # [MEM]: complete means from every cluster (3.1a) and within clusters (3.1b).
    return LOW if yes(a["3.1a"]) and yes(a["3.1b"]) else _missingness(a)


def _missing_chain(opened_by: Callable[[Answers], bool]) -> tuple[Q, ...]:
    return (
        Q("3.2", NO_NI, opened_by),
        Q("3.3", ANY5, lambda a: no(a.get("3.2"))),
        Q("3.4", ANY5, lambda a: yes_or_ni(a.get("3.3"))),
    )


_MISSING_CHAIN = 2 + 2 * (2 + 3 * 5)  # once 3.2 is asked: 36
MISSING_PARALLEL = Spec(
    (Q("3.1", ANY5), *_missing_chain(lambda a: no_or_ni(a["3.1"]))),
    missing_parallel,
    2 + 3 * _MISSING_CHAIN,
)
MISSING_CLUSTER = Spec(
    (
        Q("3.1a", ANY5),
        Q("3.1b", ANY5),
        *_missing_chain(lambda a: no_or_ni(a["3.1a"]) or no_or_ni(a["3.1b"])),
    ),
    missing_cluster,
    2 * 2 + 21 * _MISSING_CHAIN,
)


# --- Domain 4, measurement of the outcome ------------------------------------------------------
def _measurement(a: Answers, unaware: bool) -> str:
    if yes(a["4.1"]) or yes(a["4.2"]):
        return HIGH
    floor = LOW if no(a["4.2"]) else SOME  # 4.2 NI: at best some concerns
    if unaware or no(a["4.4"]):
        return floor
    return SOME if no(a["4.5"]) else HIGH


def measurement_parallel(a: Answers) -> str:
    return _measurement(a, no(a.get("4.3")))


def measurement_cluster(a: Answers) -> str:
    # [MEM]: assessors unaware of the trial (4.3a) count like blinded ones (4.3b).
    return _measurement(a, no(a.get("4.3a")) or no(a.get("4.3b")))


def _assessor_chain(last: str) -> tuple[Q, ...]:
    return (
        Q("4.4", ANY5, lambda a: yes_or_ni(a.get(last))),
        Q("4.5", ANY5, lambda a: yes_or_ni(a.get("4.4"))),
    )


def _both_no_or_ni(a: Answers) -> bool:
    return no_or_ni(a["4.1"]) and no_or_ni(a["4.2"])


_AFTER_43 = 2 + 3 * (2 + 3 * 5)  # 4.3 N/PN ends; else 4.4 then 4.5: 53
MEASUREMENT_PARALLEL = Spec(
    (Q("4.1", ANY5), Q("4.2", ANY5), Q("4.3", ANY5, _both_no_or_ni), *_assessor_chain("4.3")),
    measurement_parallel,
    2 * 5 + 3 * 2 + 9 * _AFTER_43,
)
MEASUREMENT_CLUSTER = Spec(
    (
        Q("4.1", ANY5),
        Q("4.2", ANY5),
        Q("4.3a", ANY5, _both_no_or_ni),
        Q("4.3b", ANY5, lambda a: yes_or_ni(a.get("4.3a"))),
        *_assessor_chain("4.3b"),
    ),
    measurement_cluster,
    2 * 5 + 3 * 2 + 9 * (2 + 3 * _AFTER_43),
)


# --- Domain 5, selection of the reported result (same in all three sets) ----------------------
def reported(a: Answers) -> str:
    if yes(a["5.2"]) or yes(a["5.3"]):
        return HIGH
    if a["5.2"] == "NI" or a["5.3"] == "NI":
        return SOME
    return LOW if yes(a["5.1"]) else SOME


REPORTED = Spec((Q("5.1", ANY5), Q("5.2", ANY5), Q("5.3", ANY5)), reported, 125)


# --- Crossover domain S, period and carryover effects (NEW; [MEM]) -----------------------------
# Questions, condition and algorithm [MEM] (our own rule; subject of the domain: [H23]):
# S.3 N/PN -> high; S.3 NI -> some concerns; S.3 Y/PY -> low when the two orders had about as
# many participants (S.1) or the analysis allowed for the periods (S.2), else some concerns.
def carryover(a: Answers) -> str:
    if no(a["S.3"]):
        return HIGH
    if a["S.3"] == "NI":
        return SOME
    return LOW if yes(a["S.1"]) or yes(a.get("S.2")) else SOME


CARRYOVER = Spec(
    (Q("S.1", ANY5), Q("S.2", ANY5, lambda a: no_or_ni(a["S.1"])), Q("S.3", ANY5)),
    carryover,
    2 * 5 + 3 * 5 * 5,
)


SETS: dict[str, dict[tuple[str, str], Spec]] = {
    "rob2-parallel": {
        ("1", "assignment"): RANDOMISATION,
        ("2", "assignment"): ASSIGNMENT_PARALLEL,
        ("2", "adhering"): ADHERING,
        ("3", "assignment"): MISSING_PARALLEL,
        ("4", "assignment"): MEASUREMENT_PARALLEL,
        ("5", "assignment"): REPORTED,
    },
    "rob2-cluster": {
        ("1", "assignment"): RANDOMISATION,
        ("1b", "assignment"): RECRUITMENT,
        ("2", "assignment"): ASSIGNMENT_CLUSTER,
        ("2", "adhering"): ADHERING,
        ("3", "assignment"): MISSING_CLUSTER,
        ("4", "assignment"): MEASUREMENT_CLUSTER,
        ("5", "assignment"): REPORTED,
    },
    "rob2-crossover": {
        ("1", "assignment"): RANDOMISATION,
        ("S", "assignment"): CARRYOVER,
        ("2", "assignment"): ASSIGNMENT_PARALLEL,
        ("2", "adhering"): ADHERING,
        ("3", "assignment"): MISSING_PARALLEL,
        ("4", "assignment"): MEASUREMENT_PARALLEL,
        ("5", "assignment"): REPORTED,
    },
}
CASES = [(set_id, key) for set_id, domains in SETS.items() for key in domains]


def _case_id(case) -> str:
    set_id, (domain, effect) = case
    return f"{set_id.removeprefix('rob2-')}-{domain}-{effect}"


@pytest.mark.parametrize("case", CASES, ids=_case_id)
def test_every_path_matches_the_published_algorithm(case):
    set_id, key = case
    spec = SETS[set_id][key]
    domain = builtin_question_set(set_id).domain(*key)
    assert tuple(q.id for q in domain.questions) == tuple(q.id for q in spec.questions)
    assert {q.id: q.options for q in domain.questions} == {q.id: q.options for q in spec.questions}
    expected = {tuple(path.items()): spec.judge(path) for path in walk(spec)}
    assert len(expected) == spec.paths, "hand count and hand-written conditions disagree"
    reachable = {tuple(path.items()) for path in answer_paths(domain)}
    assert reachable == set(expected), "the file's conditions differ from the published ones"
    wrong = [
        (path, got, want)
        for path, want in expected.items()
        if (got := judge_domain(domain, dict(path))) != want
    ]
    assert not wrong, wrong[:5]


COMBINATION_LIMIT = 20_000


def _on_path(spec: Spec, full: Answers) -> Answers:
    """The answers the hand-written conditions count, from answers to every question."""
    on_path: Answers = {}
    for q in spec.questions:
        if q.asked(on_path):
            on_path[q.id] = full[q.id]
    return on_path


def _with_off_path_answers(spec: Spec) -> Iterator[Answers]:
    """Answers to every question, asked or not. Up to COMBINATION_LIMIT combinations: all of
    them. Above: every reachable path, with the questions off it answered in every option (the
    k-th filling gives off-path question i its option (k + i) mod n), so every path is met
    with each off-path option at least once."""
    sizes = [len(q.options) for q in spec.questions]
    if _product(sizes) <= COMBINATION_LIMIT:
        ids = [q.id for q in spec.questions]
        for codes in itertools.product(*(q.options for q in spec.questions)):
            yield dict(zip(ids, codes))
        return
    for path in walk(spec):
        off = [q for q in spec.questions if q.id not in path]
        for k in range(max((len(q.options) for q in off), default=1)):
            full = dict(path)
            for i, q in enumerate(off):
                full[q.id] = q.options[(k + i) % len(q.options)]
            yield full


def _product(sizes: list[int]) -> int:
    total = 1
    for n in sizes:
        total *= n
    return total


@pytest.mark.parametrize("case", CASES, ids=_case_id)
def test_answers_off_the_path_never_change_the_judgement(case):
    """Answers to questions that are not asked (stale answers kept in a file) are ignored."""
    set_id, key = case
    spec = SETS[set_id][key]
    domain = builtin_question_set(set_id).domain(*key)
    paths_met: set[tuple] = set()
    for full in _with_off_path_answers(spec):
        on_path = _on_path(spec, full)
        paths_met.add(tuple(on_path.items()))
        assert judge_domain(domain, full) == spec.judge(on_path), full
    assert len(paths_met) == spec.paths  # every reachable path was met


@pytest.mark.parametrize("case", CASES, ids=_case_id)
def test_a_path_missing_any_asked_answer_is_incomplete(case):
    set_id, key = case
    spec = SETS[set_id][key]
    domain = builtin_question_set(set_id).domain(*key)
    for path in itertools.islice(walk(spec), 0, None, 7):  # every 7th path, each answer dropped
        for qid in path:
            partial = {k: v for k, v in path.items() if k != qid}
            assert judge_domain(domain, partial) == "incomplete", (path, qid)


# --- the sets as a whole ------------------------------------------------------------------------


def test_the_variant_sets_are_bundled_beside_the_parallel_one():
    assert {"rob2-parallel", "rob2-cluster", "rob2-crossover"} <= set(available_question_sets())
    cluster = builtin_question_set("rob2-cluster")
    crossover = builtin_question_set("rob2-crossover")
    # Domain order of the variants (Cochrane Handbook v6 ch. 23; the variants' domain lists).
    assert cluster.domain_ids() == ["1", "1b", "2", "3", "4", "5"]
    assert crossover.domain_ids() == ["1", "S", "2", "3", "4", "5"]
    for qset in (cluster, crossover):
        assert qset.effects() == ["assignment", "adhering"]
        assert "18 March 2021" in qset.source and "chapter 23" in qset.source
        assert qset.licence


def test_new_domain_names_and_wording():
    cluster = builtin_question_set("rob2-cluster")
    crossover = builtin_question_set("rob2-crossover")
    # [T3]: the published reproduction of the 2021 CRT template.
    assert cluster.domain("1b").name == (
        "Bias arising from the timing of identification or recruitment of participants"
    )
    assert cluster.domain("1b").question("1b.1").text == (
        "Were all the individual participants identified and recruited (if appropriate)"
        " before randomization of clusters?"
    )
    assert cluster.domain("1b").question("1b.2").condition_text == "If N/PN/NI to 1b.1"
    assert cluster.domain("1").question("1.2").text == (
        "Was the allocation sequence concealed until clusters were enrolled and assigned to"
        " interventions?"
    )
    assert cluster.domain("2").question("2.1a").text == (
        "Were participants aware that they were in a trial?"
    )
    assert cluster.domain("2").question("2.1b").condition_text == "If Y/PY/NI to 2.1a"
    assert cluster.domain("2").question("2.3").condition_text == "If Y/PY/NI to 2.1b or 2.2"
    # Subject of the crossover domain: [H23]; its name and questions are [MEM].
    assert crossover.domain("S").name == "Bias arising from period and carryover effects"
    # Shared domains keep the parallel wording and names [R19].
    parallel = builtin_question_set("rob2-parallel")
    for qset in (cluster, crossover):
        for did in ("2", "3", "4", "5"):
            assert qset.domain(did).name == parallel.domain(did).name
        assert qset.domain("5").question("5.1").text == parallel.domain("5").question("5.1").text


def test_every_question_of_the_variants_names_its_source():
    """Each question and rule table of the variant files carries a source tag or a note saying
    where it comes from (the provenance check of the data files' rows)."""
    import re

    from robtui.paths import bundled_dir

    tags = re.compile(r"\[(T3|R19|MEM|H23|H51|L15|E09)\]|from memory")
    for name in ("rob2-cluster.toml", "rob2-crossover.toml"):
        lines = (bundled_dir("signalling_questions") / name).read_text(encoding="utf-8").splitlines()
        for i, line in enumerate(lines):
            if line.startswith("[[domain.question]]"):
                assert tags.search(line) or _table_or_domain_note(lines, i), (name, i + 1)
            if line.startswith("[[domain.table]]"):
                note = " ".join(lines[i + 1 : i + 8])
                assert tags.search(note), (name, i + 1)
        text = "\n".join(lines).lower()
        assert "third-party" not in text and "transcription" not in text


def _table_or_domain_note(lines: list[str], i: int) -> bool:
    """A question without its own tag is covered by its domain's note ("Questions and rows")."""
    for line in lines[i:]:
        if line.startswith("# Questions and rows"):
            return True
        if line.startswith("# ----"):
            return False
    return False


def test_overall_covers_the_extra_domain():
    cluster = builtin_question_set("rob2-cluster")
    answers = {
        "1.1": "Y", "1.2": "Y", "1.3": "N",
        "1b.1": "N", "1b.2": "Y", "1b.3": "N",
        "2.1a": "N", "2.2": "N", "2.6": "Y",
        "3.1a": "Y", "3.1b": "Y",
        "4.1": "N", "4.2": "N", "4.3a": "N",
        "5.1": "Y", "5.2": "N", "5.3": "N",
    }
    proposed = propose_all(cluster, "assignment", answers)
    assert proposed == {"1": LOW, "1b": HIGH, "2": LOW, "3": LOW, "4": LOW, "5": LOW,
                        "overall": HIGH}
    answers["1b.1"] = "Y"
    del answers["1b.2"]
    assert propose_all(cluster, "assignment", answers)["overall"] == LOW
    del answers["1b.3"]
    assert propose_all(cluster, "assignment", answers)["overall"] == "incomplete"
