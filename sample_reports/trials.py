# ruff: noqa: ISC004  (prose data: long sentences are split over adjacent string literals)
"""The invented trials behind the sample reports (all names, places and numbers fictional)."""

from __future__ import annotations

from make_reports import Trial


def _refs(topic: str, extra: int = 0) -> list[str]:
    base = [
        f"Quellmann R, Abeyta S. The burden of {topic} in primary care: a fictional survey. "
        "Invent Health Rev. 2027;12:44-51.",
        "Marrow T, Ishikawa-Pell D, Obuya N. Designing pragmatic trials in imaginary settings. "
        "J Invent Methods. 2026;3:210-218.",
        f"Castellane P, Hurd L. Natural history of {topic}: a cohort that never was. "
        "Arch Sample Med. 2025;88:1002-1010.",
        "Ferreira-Lund A, Okafor B. Outcome measures for sample trials. Example Trials J. "
        "2028;5:77-85.",
        "Brannigan C, Sato M, Velez R. Handling missing data in invented studies. "
        "Stat Made Up. 2029;14:300-312.",
    ]
    more = [
        f"Lindqvist-Arroyo E, Dube K. Mechanisms in {topic}: a speculative review. "
        f"Theor Invent Med. 20{30 - i % 5};{20 + i}:{100 + 7 * i}-{110 + 7 * i}."
        for i in range(extra)
    ]
    return base + more


def _background(condition: str, intervention: str, gap: str) -> list[str]:
    return [
        f"{condition.capitalize()} is common in the adult population served by the regional "
        "health network of the fictional county of Wexmoor, and it accounts for a large share "
        "of repeat consultations in general practice.1 Patients describe the condition as "
        "disruptive to work, sleep and family life, and many try several treatments before "
        "finding one that helps.2",
        f"{intervention} was developed at the Wexmoor Institute of Applied Therapeutics as a "
        f"low-cost option for {condition}. Early uncontrolled experience suggested a benefit, "
        "but small case series are prone to regression to the mean and to the optimism of "
        "enthusiastic clinicians.3 "
        f"{gap}",
        "We therefore conducted a randomised trial to estimate the effect of assignment to "
        f"{intervention} compared with the comparator described below, and report it following "
        "the CONSORT 2010 statement.4",
    ]


def _discussion(intervention: str, finding: str, limitation: str, extra: int = 0) -> list[str]:
    paras = [
        f"In this trial, {finding} The size of the difference is in the range that patients "
        "and clinicians in our advisory panel described as worthwhile, although the confidence "
        "interval leaves room for a smaller effect.",
        f"Our findings should be read alongside the limitations of the trial. {limitation} "
        "The trial was conducted in a single fictional health network, and the results may not "
        "transfer to settings with different referral patterns or standards of usual care.",
        f"Further trials of {intervention} should enrol a broader population, follow "
        "participants for longer, and measure outcomes that matter to patients with assessors "
        "who do not know the allocated treatment.5",
    ]
    for i in range(extra):
        paras.insert(
            1 + i,
            f"A further consideration is the consistency of the effect across subgroups "
            f"(analysis {i + 1}). The estimates were similar for men and women and for younger "
            "and older participants, but these comparisons were not powered to detect "
            "differences and should be regarded as exploratory. Interaction tests are prone "
            "to false positive results when many are performed, and we did not adjust for "
            "multiplicity in these analyses.",
        )
    return paras


def _table(a: str, b: str, rows: list[tuple[str, str, str]]) -> list[list[str]]:
    return [["Characteristic", a, b]] + [list(r) for r in rows]


ALDER = Trial(
    id="alder-migraine",
    title="Oral velarin for the prevention of episodic migraine: a randomised, double-blind, "
    "placebo-controlled trial (ALDER)",
    authors="Imogen Tarrant, Rafael Okonkwo-Senn, Beatrix Lowell, Tomasz Ferrand",
    affiliation="Department of Neurology, Wexmoor General Hospital, Wexmoor (fictional); "
    "Wexmoor Trials Unit",
    issue="2032; 7: 101-106",
    condition="episodic migraine",
    intervention="Velarin",
    comparator="placebo",
    abstract={
        "Background": "Velarin is an invented oral agent proposed for migraine prevention.",
        "Methods": "Adults with 4 to 14 migraine days per month were randomly assigned (1:1) "
        "to velarin 40 mg daily or matching placebo for 12 weeks. The primary outcome was the "
        "change in monthly migraine days.",
        "Results": "Of 312 participants randomised, 298 (95.5%) completed the trial. Monthly "
        "migraine days fell by 3.1 with velarin and 1.8 with placebo (difference -1.3, 95% CI "
        "-2.0 to -0.6; p < 0.001).",
        "Conclusions": "Velarin reduced migraine days modestly over 12 weeks.",
        "Registration": "Registry of Invented Trials RIT-2030-00412.",
    },
    background=_background(
        "episodic migraine",
        "Velarin",
        "No randomised comparison with placebo has been reported.",
    ),
    design=[
        "ALDER was a parallel-group, double-blind, placebo-controlled randomised trial with a "
        "1:1 allocation ratio, conducted in nine outpatient neurology clinics of the Wexmoor "
        "network between March 2030 and June 2031."
    ],
    participants=[
        "Adults aged 18 to 65 years with a diagnosis of migraine for at least one year and 4 to "
        "14 migraine days per month during a 4-week baseline diary period were eligible. We "
        "excluded people with medication-overuse headache, pregnancy, or use of another "
        "preventive drug in the previous 3 months."
    ],
    interventions=[
        "Participants took one capsule of velarin 40 mg or an identical placebo capsule each "
        "morning for 12 weeks. Capsules were identical in size, colour, taste and packaging, "
        "and were supplied by the hospital pharmacy in numbered bottles."
    ],
    outcomes=[
        "The primary outcome was the change from baseline in the number of monthly migraine "
        "days during weeks 9 to 12, recorded in an electronic headache diary. Secondary "
        "outcomes were the proportion of participants with at least a 50% reduction in "
        "migraine days, use of acute medication, and the Headache Impact Score."
    ],
    sample_size=[
        "A sample of 150 participants per group gave 90% power to detect a difference of 1.0 "
        "migraine day per month (SD 2.6) at a two-sided alpha of 0.05, allowing for 10% loss."
    ],
    randomisation_heading="Randomisation and masking",
    randomisation=[
        (
            "Sequence generation",
            "The allocation sequence was generated by an independent statistician using a "
            "computer random number generator, with permuted blocks of variable size (4 and "
            "6) stratified by clinic.",
        ),
        (
            "Allocation concealment",
            "Clinic staff enrolled participants and obtained the allocation from a central "
            "web-based randomisation service run by the Wexmoor Trials Unit only after the "
            "participant's details had been entered and locked, so the next assignment could "
            "not be foreseen.",
        ),
        (
            "Masking",
            "Participants, clinic staff, diary reviewers and outcome assessors were unaware of "
            "the allocated treatment until the database was locked.",
        ),
    ],
    statistics=[
        "The primary analysis followed the intention-to-treat principle and included all "
        "randomised participants in the group to which they were assigned. Missing diary data "
        "were handled by multiple imputation under a missing-at-random assumption, and a "
        "per-protocol analysis was performed as a sensitivity analysis. The statistical "
        "analysis plan was finalised before unblinding."
    ],
    flow=[
        "Of 401 people screened, 312 were randomised: 157 to velarin and 155 to placebo. Seven "
        "participants in each group withdrew before week 12 (velarin: 4 lost to follow-up, 3 "
        "withdrew consent; placebo: 5 lost to follow-up, 2 withdrew consent). All 312 "
        "randomised participants were included in the primary analysis."
    ],
    baseline_table=_table(
        "Velarin (n = 157)",
        "Placebo (n = 155)",
        [
            ("Age, years, mean (SD)", "38.4 (10.2)", "39.1 (9.8)"),
            ("Women, n (%)", "128 (81.5)", "124 (80.0)"),
            ("Migraine days/month", "8.9 (2.7)", "9.1 (2.8)"),
            ("Aura, n (%)", "41 (26.1)", "44 (28.4)"),
        ],
    ),
    primary=[
        "Monthly migraine days fell by 3.1 (SD 2.9) with velarin and by 1.8 (SD 2.8) with "
        "placebo, a difference of -1.3 days (95% CI -2.0 to -0.6; p < 0.001). The per-protocol "
        "analysis gave a similar estimate (-1.4 days)."
    ],
    figure_caption="Figure 1. Mean monthly migraine days by 4-week period in each group; bars "
    "show 95% confidence intervals.",
    secondary=[
        "A 50% or greater reduction in migraine days was reported by 62 of 157 participants "
        "(39.5%) with velarin and 40 of 155 (25.8%) with placebo (risk ratio 1.53, 95% CI 1.10 "
        "to 2.12). Acute medication use fell by 1.9 versus 1.1 days per month."
    ],
    harms=[
        "Adverse events were reported by 48 participants (30.6%) with velarin and 41 (26.5%) "
        "with placebo; the most common were drowsiness and dry mouth. No serious adverse "
        "events were judged related to treatment."
    ],
    discussion=_discussion(
        "velarin",
        "velarin reduced monthly migraine days by about one day more than placebo.",
        "Twelve weeks is short for a preventive treatment.",
    ),
    registration="The trial was registered before enrolment began (Registry of Invented Trials "
    "RIT-2030-00412); the protocol and statistical analysis plan are available from the Wexmoor "
    "Trials Unit. The primary outcome reported here is the one registered.",
    funding="Funded by the Wexmoor Health Research Fund (fictional), which had no role in the "
    "design, conduct, analysis or reporting of the trial.",
    references=_refs("migraine"),
    reviewer_meets="clear central web-based allocation, full masking with identical capsules, "
    "low balanced attrition, intention-to-treat analysis, registered outcome reported",
)

BIRCH = Trial(
    id="birch-knee",
    title="A home exercise app for knee osteoarthritis: a randomised trial in primary care (BIRCH)",
    authors="Sunniva Achterberg, Kwame Delacroix-Ibe, Oona Pritchard",
    affiliation="Northmere Musculoskeletal Research Group, Northmere (fictional)",
    issue="2032; 7: 107-111",
    condition="knee osteoarthritis",
    intervention="the StrideWell exercise app",
    comparator="an advice leaflet",
    abstract={
        "Background": "Exercise helps knee osteoarthritis, but adherence is poor.",
        "Methods": "Adults with knee pain were randomised to the StrideWell app or an advice "
        "leaflet. The primary outcome was knee pain on a 0 to 10 scale at 12 weeks.",
        "Results": "Of 184 participants, 171 provided primary outcome data. Pain was 0.9 points "
        "lower with the app (95% CI 0.3 to 1.5).",
        "Conclusions": "The app reduced knee pain modestly.",
        "Registration": "RIT-2029-01877.",
    },
    background=_background(
        "knee osteoarthritis",
        "StrideWell",
        "Whether an app improves pain more than written advice is unknown.",
    ),
    design=[
        "BIRCH was a two-arm, parallel-group randomised trial in 14 general practices in Northmere."
    ],
    participants=[
        "People aged 45 years or older with knee pain on most days for at least 3 months and a "
        "clinical diagnosis of osteoarthritis were invited by letter from their practice. People "
        "awaiting joint replacement or unable to use a smartphone were excluded."
    ],
    interventions=[
        "The StrideWell app delivered a 12-week programme of progressive strengthening "
        "exercises with video demonstrations and weekly reminders. The comparator group "
        "received a printed leaflet describing the same exercises."
    ],
    outcomes=[
        "The primary outcome was average knee pain over the previous week on a 0 to 10 numeric "
        "rating scale at 12 weeks, collected by postal questionnaire. Secondary outcomes were "
        "physical function, global rating of change, and exercise adherence."
    ],
    sample_size=[
        "We planned to recruit 180 participants to detect a difference of 1.0 point in pain "
        "(SD 2.0) with 90% power, allowing for 15% loss to follow-up."
    ],
    randomisation_heading="Randomisation",
    randomisation=[
        (
            "",
            "Participants were randomly assigned to the app or the leaflet in a 1:1 ratio. "
            "The research nurse informed participants of their group at the baseline visit. "
            "Neither participants nor the research nurse were blinded, and pain was reported by "
            "participants on the postal questionnaire.",
        )
    ],
    statistics=[
        "Pain at 12 weeks was compared between groups with linear regression adjusted for "
        "baseline pain. Participants were analysed in the groups to which they were randomised; "
        "those without a 12-week questionnaire were excluded from the primary analysis."
    ],
    flow=[
        "A total of 184 participants were randomised, 92 to each group. Primary outcome data "
        "were available for 86 of 92 in the app group and 85 of 92 in the leaflet group."
    ],
    baseline_table=_table(
        "App (n = 92)",
        "Leaflet (n = 92)",
        [
            ("Age, years, mean (SD)", "63.2 (8.1)", "62.7 (8.6)"),
            ("Women, n (%)", "55 (59.8)", "57 (62.0)"),
            ("Knee pain, 0-10", "5.8 (1.6)", "5.9 (1.5)"),
        ],
    ),
    primary=[
        "Mean knee pain at 12 weeks was 4.1 in the app group and 5.0 in the leaflet group "
        "(adjusted difference -0.9, 95% CI -1.5 to -0.3; p = 0.004)."
    ],
    figure_caption="Figure 1. Knee pain at baseline, 6 and 12 weeks by group (means and 95% "
    "confidence intervals).",
    secondary=[
        "Physical function improved more with the app (difference 3.4 points on a 0 to 68 "
        "scale, 95% CI 0.8 to 6.0). Participants in the app group completed a median of 2.6 "
        "sessions per week."
    ],
    harms=[
        "Eight participants with the app and five with the leaflet reported a temporary "
        "increase in knee pain after exercise; no serious adverse events occurred."
    ],
    discussion=_discussion(
        "StrideWell",
        "the app reduced knee pain at 12 weeks compared with an advice leaflet.",
        "The report of allocation does not describe how the sequence was produced or kept "
        "from recruiters, and pain was self-reported by participants who knew their group.",
    ),
    registration="Registry of Invented Trials RIT-2029-01877.",
    funding="Supported by a grant from the Northmere Primary Care Foundation (fictional).",
    references=_refs("osteoarthritis"),
    reviewer_meets="randomised with no information on sequence generation or concealment; "
    "self-reported pain in an unblinded comparison",
)

CEDAR = Trial(
    id="cedar-sleep",
    title="An audio mindfulness programme for insomnia in shift workers: an open-label "
    "randomised trial (CEDAR)",
    authors="Leontyne Baptiste, Harriet Quaye, Mateus Vornholt",
    affiliation="Institute for Sleep and Work, Larkspur University (fictional)",
    issue="2032; 7: 112-116",
    condition="insomnia in shift workers",
    intervention="the Calmwave audio programme",
    comparator="usual care",
    abstract={
        "Background": "Shift workers often sleep poorly.",
        "Methods": "Hospital shift workers with insomnia were randomised to Calmwave, an "
        "8-week audio mindfulness programme, or to usual care. The primary outcome was "
        "self-rated sleep quality at 8 weeks.",
        "Results": "Among 240 participants, sleep quality improved more with Calmwave "
        "(difference 2.4 points, 95% CI 1.5 to 3.3).",
        "Conclusions": "Participants who used Calmwave rated their sleep better.",
        "Registration": "RIT-2030-00955.",
    },
    background=_background(
        "insomnia in shift workers",
        "Calmwave",
        "Mindfulness recordings are widely used but rarely tested against usual care.",
    ),
    design=[
        "CEDAR was an open-label, two-arm randomised trial among staff of three hospitals of "
        "the fictional Larkspur health board. Because the programme is a behavioural "
        "intervention, participants and the staff delivering it could not be blinded."
    ],
    participants=[
        "Staff working rotating or night shifts who scored 10 or more on the Larkspur Insomnia "
        "Index were eligible; those with a diagnosed sleep disorder other than insomnia were "
        "excluded."
    ],
    interventions=[
        "The Calmwave group received eight weekly audio sessions of 20 minutes with guided "
        "breathing and body scanning, delivered through a secure web page. The usual care "
        "group received no programme and were offered Calmwave after the trial."
    ],
    outcomes=[
        "The primary outcome was self-rated sleep quality on the 0 to 21 Larkspur Sleep Scale "
        "at 8 weeks, completed online by participants. Secondary outcomes were daytime "
        "sleepiness, sick leave days, and sleep duration recorded by a wrist actigraph."
    ],
    sample_size=[
        "A total of 240 participants provided 85% power to detect a 1.5-point difference "
        "(SD 3.5), allowing for 15% attrition."
    ],
    randomisation_heading="Randomisation and blinding",
    randomisation=[
        (
            "Sequence generation",
            "A computer-generated list with blocks of four allocated participants 1:1.",
        ),
        (
            "Allocation concealment",
            "Allocations were held by a trial administrator not involved in recruitment, who "
            "released each one by email after consent had been recorded.",
        ),
        (
            "Blinding",
            "Participants knew which group they were in and reported their own sleep quality; "
            "the actigraphy data were processed by a technician unaware of group allocation.",
        ),
    ],
    statistics=[
        "Analyses were by intention to treat with linear mixed models including all randomised "
        "participants; missing outcomes were assumed missing at random."
    ],
    flow=[
        "Of 240 randomised participants, 121 were assigned to Calmwave and 119 to usual care; "
        "primary outcome data were available for 109 and 111 respectively."
    ],
    baseline_table=_table(
        "Calmwave (n = 121)",
        "Usual care (n = 119)",
        [
            ("Age, years, mean (SD)", "36.8 (9.4)", "37.5 (9.9)"),
            ("Nurses, n (%)", "78 (64.5)", "75 (63.0)"),
            ("Sleep scale, 0-21", "12.9 (3.1)", "13.1 (3.0)"),
        ],
    ),
    primary=[
        "At 8 weeks the sleep scale improved by 4.6 points with Calmwave and by 2.2 points "
        "with usual care (difference 2.4, 95% CI 1.5 to 3.3; p < 0.001)."
    ],
    figure_caption="Figure 1. Self-rated sleep quality over 8 weeks in the two groups.",
    secondary=[
        "Actigraph sleep duration did not differ between groups (difference 6 minutes, 95% CI "
        "-9 to 21). Sick leave was similar in both groups."
    ],
    harms=["No adverse events attributable to the programme were reported."],
    discussion=_discussion(
        "Calmwave",
        "participants who received Calmwave reported better sleep than those in usual care, "
        "while objectively measured sleep duration did not change.",
        "The trial was open label and the primary outcome was self-reported, so participants' "
        "expectations may have influenced their ratings.",
    ),
    registration="Registry of Invented Trials RIT-2030-00955; protocol published before "
    "recruitment ended.",
    funding="Funded by the Larkspur Occupational Health Trust (fictional).",
    references=_refs("insomnia"),
    reviewer_meets="open-label trial with a subjective, self-reported primary outcome; objective "
    "secondary outcome assessed blind",
)

DOGWOOD = Trial(
    id="dogwood-eczema",
    title="Dermacol cream versus emollient alone for chronic hand eczema: a randomised "
    "controlled trial (DOGWOOD)",
    authors="Priya Castellanos-Hart, Edmund Vasquez-Oyelaran, Ilse Marchetti",
    affiliation="Skin Research Centre, Brackenford Infirmary (fictional)",
    issue="2032; 7: 117-121",
    condition="chronic hand eczema",
    intervention="Dermacol cream",
    comparator="emollient alone",
    abstract={
        "Background": "Chronic hand eczema is hard to treat.",
        "Methods": "Adults with chronic hand eczema were randomised to Dermacol cream plus "
        "emollient or emollient alone for 16 weeks. The primary outcome was clear or almost "
        "clear skin at 16 weeks.",
        "Results": "Of 206 randomised, 40 of 104 in the Dermacol group and 12 of 102 in the "
        "emollient group left the trial. Among completers, 44% and 27% were clear.",
        "Conclusions": "Dermacol may improve hand eczema; withdrawals limit certainty.",
        "Registration": "RIT-2029-02210.",
    },
    background=_background(
        "chronic hand eczema",
        "Dermacol",
        "Its tolerability on broken skin has been questioned.",
    ),
    design=["DOGWOOD was a two-arm parallel randomised trial at two dermatology clinics."],
    participants=[
        "Adults with hand eczema for at least 6 months despite emollients were eligible. "
        "Those with active infection or who had used systemic treatment in the last month were "
        "excluded."
    ],
    interventions=[
        "Participants applied Dermacol cream twice daily plus their usual emollient, or the "
        "emollient alone, for 16 weeks."
    ],
    outcomes=[
        "The primary outcome was a physician global assessment of clear or almost clear hands "
        "at 16 weeks, made by a dermatologist who did not know the treatment group."
    ],
    sample_size=["We aimed to randomise 200 participants to detect an absolute difference of 20%."],
    randomisation_heading="Randomisation",
    randomisation=[
        (
            "",
            "Randomisation used a computer-generated sequence prepared by the trial "
            "statistician, and allocations were placed in sequentially numbered, opaque, "
            "sealed envelopes opened by the clinic nurse after enrolment. Participants and "
            "clinic nurses were aware of the allocated treatment, because the cream and the "
            "emollient differ in appearance and smell.",
        )
    ],
    statistics=[
        "The primary analysis included participants who completed 16 weeks of treatment (per "
        "protocol). Participants who withdrew were not followed up, and no imputation of "
        "missing outcomes was performed."
    ],
    flow=[
        "Of 206 participants randomised, 104 were allocated to Dermacol and 102 to emollient "
        "alone. Forty participants (38.5%) in the Dermacol group withdrew, 26 of them because "
        "of burning or stinging of the skin, compared with 12 (11.8%) in the emollient group, "
        "mostly for lack of time. The primary analysis therefore included 64 and 90 "
        "participants."
    ],
    baseline_table=_table(
        "Dermacol (n = 104)",
        "Emollient (n = 102)",
        [
            ("Age, years, mean (SD)", "44.0 (12.6)", "45.3 (12.1)"),
            ("Women, n (%)", "61 (58.7)", "58 (56.9)"),
            ("Severe eczema, n (%)", "39 (37.5)", "36 (35.3)"),
        ],
    ),
    primary=[
        "Among participants completing treatment, 28 of 64 (43.8%) with Dermacol and 24 of 90 "
        "(26.7%) with emollient alone were clear or almost clear (risk ratio 1.64, 95% CI 1.05 "
        "to 2.56)."
    ],
    figure_caption="Figure 1. Flow of participants through the trial, with withdrawals and "
    "their reasons in each group.",
    secondary=[
        "Itch scores fell in both groups, with no clear difference between them (difference "
        "-0.6, 95% CI -1.4 to 0.2)."
    ],
    harms=[
        "Burning or stinging on application was reported by 31 participants (29.8%) using "
        "Dermacol and by 4 (3.9%) using emollient alone."
    ],
    discussion=_discussion(
        "Dermacol",
        "more participants who completed Dermacol treatment had clear hands than those using "
        "emollient alone.",
        "Many more participants withdrew from the Dermacol group, often because of skin "
        "reactions, and the analysis was restricted to completers, so the result may favour "
        "Dermacol.",
    ),
    registration="Registry of Invented Trials RIT-2029-02210.",
    funding="Funded by Brackenford Dermatology Charitable Fund (fictional); Dermacol was "
    "donated by its invented manufacturer, Halvorsen Skin Labs.",
    references=_refs("hand eczema"),
    reviewer_meets="heavy, unbalanced attrition related to side effects, with a completers-only "
    "analysis",
)

ELM = Trial(
    id="elm-copd",
    title="Pulmorin inhaler in moderate COPD: a randomised, double-blind trial (ELM)",
    authors="Yusuf Halloran, Agathe Brennecke, Chidi Marquand-Sol",
    affiliation="Respiratory Unit, Saltmarsh Royal Hospital (fictional)",
    issue="2032; 7: 122-126",
    condition="moderate chronic obstructive pulmonary disease",
    intervention="the Pulmorin inhaler",
    comparator="a placebo inhaler",
    abstract={
        "Background": "Pulmorin is an invented inhaled agent.",
        "Methods": "Adults with moderate COPD were randomised to Pulmorin or placebo inhalers "
        "for 24 weeks. The primary outcome was the number of exacerbation-free days.",
        "Results": "Among 268 participants, Pulmorin increased exacerbation-free days by 9.2 "
        "(95% CI 2.1 to 16.3).",
        "Conclusions": "Pulmorin increased exacerbation-free days.",
        "Registration": "RIT-2028-03321.",
    },
    background=_background(
        "moderate COPD",
        "Pulmorin",
        "Its effect on lung function and exacerbations has not been compared with placebo.",
    ),
    design=["ELM was a double-blind, placebo-controlled, parallel-group trial at six sites."],
    participants=[
        "Adults aged 40 to 80 years with moderate COPD and at least one exacerbation in the "
        "previous year were eligible."
    ],
    interventions=[
        "Participants used Pulmorin or an identical placebo inhaler twice daily for 24 weeks."
    ],
    outcomes=[
        "In this report the primary outcome is the number of exacerbation-free days over 24 "
        "weeks. Forced expiratory volume in one second (FEV1) at 12 weeks, the dyspnoea score "
        "and quality of life were secondary outcomes."
    ],
    sample_size=["A sample of 260 was chosen to detect a difference of 8 exacerbation-free days."],
    randomisation_heading="Randomisation and masking",
    randomisation=[
        (
            "Sequence generation",
            "Sequences were computer generated in blocks of four by the sponsor's statistician.",
        ),
        (
            "Allocation concealment",
            "Inhalers were pre-packed in identical numbered kits and dispensed in sequence by "
            "the site pharmacist.",
        ),
        ("Masking", "Participants and investigators were masked to allocation."),
    ],
    statistics=[
        "Exacerbation-free days were compared with a negative binomial model in all randomised "
        "participants. FEV1 was analysed with a mixed model for repeated measures."
    ],
    flow=[
        "Of 268 participants randomised (135 Pulmorin, 133 placebo), 251 completed 24 weeks; "
        "all randomised participants were analysed."
    ],
    baseline_table=_table(
        "Pulmorin (n = 135)",
        "Placebo (n = 133)",
        [
            ("Age, years, mean (SD)", "64.9 (7.7)", "65.4 (7.2)"),
            ("FEV1, % predicted", "58.2 (9.9)", "57.6 (10.3)"),
            ("Current smokers, n (%)", "42 (31.1)", "45 (33.8)"),
        ],
    ),
    primary=[
        "Participants using Pulmorin had 9.2 more exacerbation-free days over 24 weeks than "
        "those using placebo (95% CI 2.1 to 16.3; p = 0.011)."
    ],
    figure_caption="Figure 1. Cumulative proportion of participants free of exacerbation over "
    "24 weeks.",
    secondary=[
        "FEV1 at 12 weeks differed by 18 mL between groups (95% CI -22 to 58; p = 0.38). The "
        "dyspnoea score and quality of life did not differ."
    ],
    harms=["Hoarseness was more common with Pulmorin (9.6% versus 3.0%)."],
    discussion=_discussion(
        "Pulmorin",
        "Pulmorin increased the number of exacerbation-free days, but did not change lung "
        "function at 12 weeks.",
        "The registry record named FEV1 at 12 weeks as the primary outcome; the steering "
        "committee changed the primary outcome to exacerbation-free days after recruitment had "
        "finished, before unblinding according to the committee minutes.",
    ),
    registration="Registered at the Registry of Invented Trials (RIT-2028-03321), where the "
    "primary outcome listed at registration was FEV1 at 12 weeks.",
    funding="Funded by Saltmarsh Pharmaceuticals (fictional), which employed two authors and "
    "analysed the data.",
    references=_refs("COPD"),
    reviewer_meets="registered primary outcome (FEV1) switched to another outcome in the paper",
)

FIR = Trial(
    id="fir-handwashing",
    title="A classroom hand-washing programme to prevent sickness absence: a cluster "
    "randomised trial in primary schools (FIR)",
    authors="Marisol Tenbury, Declan Oyelowo-Ritter, Anneliese Crook",
    affiliation="School Health Research Unit, Ashcombe (fictional)",
    issue="2032; 7: 127-132",
    condition="infection-related school absence",
    intervention="the CleanStart programme",
    comparator="usual hygiene teaching",
    abstract={
        "Background": "Infections cause much school absence.",
        "Methods": "Twenty-four primary schools were randomised to the CleanStart programme or "
        "usual hygiene teaching. The primary outcome was the rate of absence episodes due to "
        "illness over one school year.",
        "Results": "Absence episodes were 12% lower in CleanStart schools (rate ratio 0.88, "
        "95% CI 0.79 to 0.98).",
        "Conclusions": "CleanStart modestly reduced illness absence.",
        "Registration": "RIT-2030-04108.",
    },
    background=_background(
        "infection-related school absence",
        "CleanStart",
        "Its effect has not been tested with schools as the unit of randomisation.",
    ),
    design=[
        "FIR was a cluster randomised trial with schools as clusters, because the programme is "
        "delivered to whole classes. Twenty-four state primary schools in the fictional "
        "Ashcombe district took part."
    ],
    participants=[
        "All pupils aged 5 to 11 years attending participating schools were included. Schools "
        "were randomised in July 2030, and parents of pupils were informed and could opt their "
        "child out of data collection in September 2030, after the allocation of their school "
        "was known."
    ],
    interventions=[
        "CleanStart schools received wall-mounted soap dispensers, a 6-lesson hygiene "
        "curriculum and scheduled hand-washing before lunch. Control schools continued usual "
        "hygiene teaching."
    ],
    outcomes=[
        "The primary outcome was the number of absence episodes due to illness per pupil-year, "
        "taken from school registers and coded by office staff who knew which programme the "
        "school had."
    ],
    sample_size=[
        "With 24 clusters of about 250 pupils, an intracluster correlation of 0.02 and a "
        "coefficient of variation of cluster size of 0.3, the trial had 80% power to detect a "
        "15% reduction."
    ],
    randomisation_heading="Randomisation",
    randomisation=[
        (
            "",
            "An independent statistician allocated schools 1:1 using a computer-generated "
            "sequence, stratified by school size, after all 24 schools had agreed to take "
            "part. School heads were told of the allocation by letter.",
        )
    ],
    statistics=[
        "Rates were compared with a mixed-effects Poisson model with a random effect for school "
        "to account for clustering. All pupils with register data were analysed in the group "
        "of their school."
    ],
    flow=[
        "Twelve schools (3,046 pupils) were allocated to CleanStart and twelve (2,981 pupils) "
        "to usual teaching. Parents of 212 pupils in CleanStart schools and 87 in control "
        "schools opted out of data collection. All 24 schools provided register data."
    ],
    baseline_table=_table(
        "CleanStart (12 schools)",
        "Control (12 schools)",
        [
            ("Pupils analysed", "2,834", "2,894"),
            ("Pupils per school, mean", "236", "241"),
            ("Free school meals, %", "21.4", "19.8"),
        ],
    ),
    primary=[
        "Illness absence episodes were 1.41 per pupil-year in CleanStart schools and 1.60 in "
        "control schools (rate ratio 0.88, 95% CI 0.79 to 0.98; intracluster correlation "
        "0.018)."
    ],
    figure_caption="Figure 1. Illness absence episodes per pupil-year in each school, by "
    "allocated group.",
    secondary=[
        "Days absent because of gastrointestinal illness fell by 18% (rate ratio 0.82, 95% CI "
        "0.70 to 0.96); respiratory absence did not change clearly."
    ],
    harms=["Skin dryness was reported in four CleanStart classes."],
    discussion=_discussion(
        "CleanStart",
        "schools allocated to CleanStart had fewer illness absence episodes than control schools.",
        "Parents learned of their school's allocation before deciding whether to opt out, and "
        "more opted out in CleanStart schools; absence coding was not blinded.",
    ),
    registration="Registry of Invented Trials RIT-2030-04108.",
    funding="Funded by the Ashcombe Education and Health Partnership (fictional).",
    references=_refs("school absence"),
    reviewer_meets="cluster-randomised design; pupils identified after the clusters' allocation "
    "was known, with unbalanced opt-outs",
)


HAZEL = Trial(
    id="hazel-cough",
    title="Nocturnel nasal spray for night-time cough in adults with chronic cough: a randomised, "
    "double-blind, placebo-controlled, two-period crossover trial (HAZEL)",
    authors="Odile Brannock, Kwame Asante-Viljoen, Petra Lindgard, Samir Hallowell",
    affiliation="Respiratory Unit, Wexmoor General Hospital, Wexmoor (fictional); "
    "Wexmoor Trials Unit",
    issue="2031; 6: 212-217",
    condition="chronic night-time cough",
    intervention="Nocturnel",
    comparator="placebo spray",
    abstract={
        "Background": "Nocturnel is an invented nasal spray proposed to calm night-time cough.",
        "Methods": "In a two-period crossover trial, adults with chronic cough received "
        "Nocturnel and placebo spray for 14 nights each, in random order, separated by a "
        "washout of 7 days. The primary outcome was the number of coughs per night, counted "
        "by an acoustic monitor in the last three nights of each period.",
        "Results": "Of 64 participants randomised, 58 completed both periods. Coughs per night "
        "were 21% lower with Nocturnel (ratio 0.79, 95% CI 0.70 to 0.89).",
        "Conclusions": "Nocturnel reduced counted night-time coughs.",
        "Registration": "Registry of Invented Trials RIT-2030-05233.",
    },
    background=_background(
        "chronic night-time cough",
        "Nocturnel",
        "No randomised comparison within the same patients has been reported.",
    ),
    design=[
        "HAZEL was a randomised, double-blind, two-period, two-sequence crossover trial at "
        "the respiratory clinic of Wexmoor General Hospital. Each participant received both "
        "treatments, one in each period, so that participants served as their own controls."
    ],
    participants=[
        "Adults with a cough lasting more than eight weeks that woke them at least three "
        "nights a week, and a stable condition over the previous month, were eligible."
    ],
    interventions=[
        "Participants used two puffs of Nocturnel or of an identical placebo spray in each "
        "nostril at bedtime for 14 nights. The two treatment periods were separated by a "
        "washout period of 7 days, chosen because the active ingredient has a half-life of "
        "about 6 hours and its effect on cough had faded within two days in earlier studies."
    ],
    outcomes=[
        "The primary outcome was the number of coughs per night, counted automatically by an "
        "acoustic monitor worn during the last three nights of each period and checked by "
        "staff who did not know the order of treatments."
    ],
    sample_size=[
        "Sixty participants completing both periods gave 90% power to detect a 20% reduction, "
        "assuming a within-participant coefficient of variation of 0.35."
    ],
    randomisation_heading="Randomisation",
    randomisation=[
        (
            "",
            "Participants were randomly assigned to one of two sequences (Nocturnel then "
            "placebo, or placebo then Nocturnel) by a central web service, with a sequence "
            "prepared by the trials unit statistician in randomly varying blocks.",
        )
    ],
    statistics=[
        "Log-transformed cough counts were analysed with a mixed model with fixed effects for "
        "treatment, period and sequence and a random effect for participant. Participants "
        "with data from one period only were included in the mixed model. A test for "
        "carryover was not planned."
    ],
    flow=[
        "Thirty-four participants were randomised to Nocturnel first and thirty to placebo "
        "first. Fifty-eight completed both periods; four withdrew during the first period and "
        "two during the second, all for reasons unrelated to cough (moving away, a hip "
        "operation)."
    ],
    baseline_table=_table(
        "Nocturnel first (n=34)",
        "Placebo first (n=30)",
        [
            ("Age, years, mean", "58", "61"),
            ("Women, n", "19", "17"),
            ("Coughs per night at entry, median", "96", "102"),
        ],
    ),
    primary=[
        "Coughs per night were 64 with Nocturnel and 81 with placebo (geometric means; ratio "
        "0.79, 95% CI 0.70 to 0.89). The period effect was small (ratio 0.97 for the second "
        "period), and results in the first period alone were similar."
    ],
    figure_caption="Figure 1. Coughs per night in each period, by sequence.",
    secondary=[
        "Cough-related sleep disturbance scores improved by 1.1 points on a 10-point scale "
        "(95% CI 0.4 to 1.8)."
    ],
    harms=["Nasal stinging was reported by six participants while using Nocturnel."],
    discussion=_discussion(
        "Nocturnel",
        "night-time coughs were fewer while participants used Nocturnel than while they used "
        "placebo spray.",
        "The washout of 7 days rested on the half-life of the active ingredient; slower "
        "effects on the airways cannot be excluded.",
    ),
    registration="Registry of Invented Trials RIT-2030-05233.",
    funding="Funded by the Wexmoor Respiratory Research Fund (fictional).",
    references=_refs("chronic cough"),
    reviewer_meets="two-period crossover: nearly equal sequences, period in the analysis, a "
    "washout argued from the half-life",
)


def _long_trial() -> Trial:
    """A longer report (about 15 pages) for speed benchmarks and the workbench."""
    methods = [
        (
            "Setting",
            [
                "The trial took place in eighteen pain clinics of the fictional Corrowdale "
                "region, serving a mixed urban and rural population of about 2.1 million "
                "people. Clinics were chosen for their experience of trials and their "
                f"capacity to recruit. Clinic {i + 1} contributed nurses trained in trial "
                "procedures and a local lead consultant."
                for i in range(3)
            ],
        ),
        (
            "Assessments",
            [
                f"Assessment visit {v} took place at week {4 * v}. At each visit the research "
                "nurse recorded pain diaries, vital signs and concomitant medicines, and "
                "participants completed questionnaires on sleep, mood and daily function. "
                "Blood samples for safety tests were taken at weeks 4, 12 and 24."
                for v in range(1, 10)
            ],
        ),
    ]
    domains = (
        "pain interference",
        "sleep quality",
        "anxiety",
        "low mood",
        "fatigue",
        "balance",
        "daily activities",
        "leisure activities",
        "treatment satisfaction",
        "physical function",
        "bodily pain",
        "general health",
        "vitality",
        "social function",
        "emotional role",
        "mental health",
        "work ability",
        "walking distance",
        "foot sensation",
    )
    methods.append(
        (
            "Secondary outcome definitions",
            [
                f"The {d} domain was scored from 0 to 100 using the invented Corrowdale Health "
                "Profile, with higher scores meaning better health. A change of 5 points was "
                "taken as the smallest difference of importance to patients, following the "
                "advice of our patient panel. Scores were collected at baseline and at weeks "
                "12 and 24."
                for d in domains
            ],
        )
    )
    results = (
        [
            (
                f"Health profile: {d}",
                [
                    f"Scores for {d} improved by {3 + i * 0.7:.1f} points with nerivane and by "
                    f"{2 + i * 0.5:.1f} points with placebo at week 24 (difference "
                    f"{1 + i * 0.2:.1f}, 95% CI {-0.5 + i * 0.1:.1f} to {2.5 + i * 0.3:.1f}). The "
                    "direction of effect was the same at week 12, and results were similar when "
                    "missing scores were imputed.",
                    f"Participants with the lowest baseline {d} scores gained the most in both "
                    "groups, which is consistent with regression to the mean; the between-group "
                    "difference did not depend on the baseline score.",
                ],
            )
            for i, d in enumerate(domains)
        ]
        + [
            (
                f"Subgroup analysis {g}",
                [
                    f"The effect on mean daily pain in the subgroups {g} was similar to the "
                    "overall estimate, with overlapping confidence intervals and no evidence of "
                    "interaction (p for interaction 0.4). The number of participants in each "
                    "subgroup was small, and these analyses were not powered for formal tests.",
                    f"Repeating the analysis {g} with multiple imputation of missing pain "
                    "scores gave the same picture, and no subgroup had been named in advance as "
                    "more likely than the others to benefit from nerivane in the protocol.",
                ],
            )
            for g in (
                "by age",
                "by sex",
                "by baseline pain",
                "by diabetes duration",
                "by clinic",
                "by diabetes type",
                "by body mass index",
                "by kidney function",
                "by baseline sleep",
                "by baseline mood",
                "by rescue medication use",
                "by neuropathy duration",
            )
        ]
        + [
            (
                f"Outcomes at week {w}",
                [
                    f"At week {w}, mean daily pain had fallen by {0.4 + w * 0.08:.1f} points with "
                    f"nerivane and by {0.3 + w * 0.055:.1f} points with placebo. Sleep interference "
                    f"scores followed the same pattern, and {30 + w} participants in the nerivane "
                    f"group and {24 + w} in the placebo group rated themselves much or very much "
                    "improved on the global impression of change.",
                    f"Rescue paracetamol was used on a median of {max(1, 9 - w // 3)} days in the "
                    f"four weeks before the week {w} visit in the nerivane group and "
                    f"{max(2, 11 - w // 3)} days in the placebo group. Diary completion exceeded "
                    "90% in both groups at this visit, and reasons for missing diaries did not "
                    "differ between groups.",
                ],
            )
            for w in range(1, 25)
        ]
        + [
            (
                "Sensitivity analyses",
                [
                    "Complete-case analysis, an analysis excluding participants with major protocol "
                    "deviations, and a tipping-point analysis for missing data all gave results "
                    "consistent with the primary analysis. Under the most pessimistic assumption "
                    "the difference remained in favour of nerivane.",
                    "Adjusting in addition for diabetes type and baseline sleep interference "
                    "changed the estimated difference by less than 0.05 points, and an analysis "
                    "of the median of each participant's daily scores in week 24 gave a "
                    "difference of -0.7 points.",
                    "Excluding the two clinics that enrolled fewer than ten participants, and "
                    "analysing pain as the average of weeks 23 and 24, gave differences of -0.7 "
                    "and -0.6 points, with confidence intervals that excluded no difference.",
                ],
            ),
        ]
    )
    return Trial(
        id="grove-neuropathy",
        title="Nerivane for painful diabetic neuropathy: a multicentre randomised, double-blind, "
        "placebo-controlled trial with a 24-week follow-up (GROVE)",
        authors="Aurelio Findlay-Mensah, Ruth Kovacs-Obi, Signe Thackeray, Omar Delacourt, "
        "Wen-Li Hargreave",
        affiliation="Corrowdale Pain Research Network (fictional); Corrowdale Clinical Trials "
        "Centre",
        issue="2032; 7: 133-148",
        condition="painful diabetic neuropathy",
        intervention="Nerivane",
        comparator="placebo",
        abstract={
            "Background": "Nerivane is an invented oral treatment for neuropathic pain.",
            "Methods": "Adults with painful diabetic neuropathy were randomised 1:1 to nerivane "
            "or placebo for 24 weeks at 18 clinics. The primary outcome was mean daily pain at "
            "week 24 on a 0 to 10 scale.",
            "Results": "Of 486 randomised, 441 completed. Pain fell by 2.3 with nerivane and "
            "1.6 with placebo (difference -0.7, 95% CI -1.1 to -0.3).",
            "Conclusions": "Nerivane reduced neuropathic pain modestly.",
            "Registration": "RIT-2029-05550.",
        },
        background=_background(
            "painful diabetic neuropathy",
            "Nerivane",
            "Two small pilot studies were inconclusive, and no adequately powered trial has "
            "been reported.",
        )
        + [
            "Painful neuropathy affects a sizeable minority of adults with long-standing "
            "diabetes in the fictional Corrowdale region, and the treatments offered in its "
            "clinics relieve pain in only some of them, often at the cost of drowsiness or "
            "dizziness that limits the dose patients will accept.5",
            "Nerivane acts on a pathway thought to amplify pain signals in damaged nerves. In "
            "the pilot studies it was taken twice daily and was tolerated at doses up to 40 mg, "
            "with dizziness as the most frequent complaint; neither study was large enough to "
            "estimate its effect on pain with useful precision.6",
            "Patients in our advisory panel asked for a trial long enough to show whether any "
            "early relief lasts, and for outcomes they could report from home. We chose a "
            "24-week treatment period and an electronic pain diary for these reasons.",
        ],
        design=[
            "GROVE was a multicentre, double-blind, parallel-group, placebo-controlled trial. "
            "The protocol was approved by the fictional Corrowdale Research Ethics Board, and "
            "all participants gave written informed consent."
        ],
        participants=[
            "Adults aged 18 to 80 years with type 1 or type 2 diabetes and painful distal "
            "symmetrical neuropathy for at least 6 months, with mean daily pain of 4 or more "
            "during a 1-week baseline, were eligible. Exclusions were other causes of "
            "neuropathy, severe renal impairment, and current use of opioids.",
            "Participants were recruited from diabetes and pain clinics and from primary care "
            "registers, and were screened by telephone before a baseline visit at which a "
            "clinic physician confirmed eligibility. Stable doses of other pain treatments "
            "were allowed if they had not changed in the 4 weeks before baseline.",
        ],
        interventions=[
            "Nerivane 20 mg or matching placebo was taken twice daily for 24 weeks, with a "
            "2-week titration from 10 mg. Rescue paracetamol was allowed up to 3 g per day."
        ],
        outcomes=[
            "The primary outcome was mean daily pain during week 24, from an electronic diary "
            "on a 0 to 10 scale. Secondary outcomes included the proportion with a 30% "
            "reduction in pain, sleep interference, and the patient global impression of "
            "change."
        ],
        sample_size=[
            "A total of 480 participants gave 90% power to detect a difference of 0.6 points "
            "(SD 2.0), allowing for 15% withdrawal."
        ],
        extra_methods=methods,
        randomisation_heading="Randomisation and masking",
        randomisation=[
            (
                "Sequence generation",
                "The randomisation list was produced by an independent statistician with a "
                "validated computer program, using permuted blocks of six stratified by clinic "
                "and diabetes type.",
            ),
            (
                "Allocation concealment",
                "Investigators obtained each treatment number from an interactive telephone "
                "system run by the Corrowdale Clinical Trials Centre after confirming "
                "eligibility.",
            ),
            (
                "Masking",
                "Nerivane and placebo tablets were identical in appearance, and participants, "
                "investigators and outcome assessors were masked until database lock.",
            ),
        ],
        statistics=[
            "The primary analysis included all randomised participants (intention to treat), "
            "using a mixed model for repeated measures with baseline pain and clinic as "
            "covariates. Missing data were addressed by multiple imputation.",
            "Secondary outcomes were analysed with the same model, or with logistic regression "
            "for binary outcomes, and are reported with 95% confidence intervals without "
            "adjustment for multiplicity. Analyses were done with the fictional Corrowdale "
            "statistical package by a statistician who did not see the group codes.",
        ],
        flow=[
            "Between May 2030 and August 2031, 612 people were screened and 486 randomised "
            "(244 nerivane, 242 placebo). Twenty-three participants in the nerivane group and "
            "22 in the placebo group withdrew before week 24, for similar reasons."
        ],
        baseline_table=_table(
            "Nerivane (n = 244)",
            "Placebo (n = 242)",
            [
                ("Age, years, mean (SD)", "61.3 (9.7)", "60.8 (10.1)"),
                ("Women, n (%)", "101 (41.4)", "98 (40.5)"),
                ("Type 2 diabetes, n (%)", "221 (90.6)", "219 (90.5)"),
                ("Mean daily pain", "6.4 (1.3)", "6.3 (1.4)"),
            ],
        ),
        primary=[
            "Mean daily pain at week 24 fell by 2.3 points with nerivane and by 1.6 with "
            "placebo (difference -0.7, 95% CI -1.1 to -0.3; p = 0.001)."
        ],
        figure_caption="Figure 1. Mean daily pain by week in the nerivane and placebo groups.",
        secondary=[
            "A 30% reduction in pain was achieved by 121 of 244 (49.6%) with nerivane and 88 "
            "of 242 (36.4%) with placebo. Sleep interference improved by 0.6 points more with "
            "nerivane.",
            "The patient global impression of change was much or very much improved in 93 of "
            "244 (38.1%) with nerivane and 67 of 242 (27.7%) with placebo. Results for each "
            "secondary outcome were similar at week 12.",
        ],
        outcome_table=[
            ["Outcome", "Nerivane", "Placebo"],
            ["Pain change, week 24", "-2.3", "-1.6"],
            ["30% responders, %", "49.6", "36.4"],
            ["Sleep interference", "-1.9", "-1.3"],
        ],
        extra_results=results,
        harms=[
            "Dizziness (14.3% versus 5.0%) and nausea (9.0% versus 4.1%) were more common with "
            "nerivane. Serious adverse events occurred in 11 and 9 participants, none judged "
            "related to treatment."
        ],
        discussion=_discussion(
            "nerivane",
            "nerivane reduced mean daily pain by 0.7 points more than placebo over 24 weeks.",
            "Dizziness may have revealed the allocation to some participants.",
            extra=14,
        ),
        registration="Registry of Invented Trials RIT-2029-05550, registered before the first "
        "participant was enrolled; outcomes are reported as registered.",
        funding="Funded by the Corrowdale Health Research Council (fictional).",
        references=_refs("neuropathic pain", extra=40),
        reviewer_meets="long report (benchmarks): central telephone allocation, masking, "
        "balanced withdrawals, intention-to-treat analysis",
    )


def _common_methods(t: Trial) -> list[tuple[str, list[str]]]:
    return [
        (
            "Ethics",
            [
                "The trial was approved by the fictional Wexmoor and District Research Ethics "
                "Committee and was conducted in accordance with the principles of good clinical "
                "practice. All participants, or for children their parents, received written "
                "information and gave consent before any trial procedure. Participants could "
                "withdraw at any time without giving a reason and without any effect on their "
                "care."
            ],
        ),
        (
            "Data collection and management",
            [
                "Data were entered into a secure electronic case report form with range checks "
                "and automatic queries for missing or implausible values. A random 10% of "
                "records were checked against source documents by a monitor from the trials "
                "unit. Questionnaires were returned by post or completed online, and "
                "non-responders received one reminder after two weeks and a telephone call "
                "after four weeks.",
                f"Participants received a small voucher for each completed follow-up. Research "
                f"staff recorded any contact with health services related to {t.condition}, "
                "and prescriptions were checked in the clinic records at the end of follow-up.",
            ],
        ),
        (
            "Patient and public involvement",
            [
                f"People with lived experience of {t.condition} helped to choose the primary "
                "outcome, reviewed the participant information and advised on the timing of "
                "follow-up visits. Two lay members sat on the trial steering committee and "
                "commented on the interpretation of the results."
            ],
        ),
        (
            "Data monitoring",
            [
                "An independent data monitoring committee reviewed unblinded safety data every "
                "six months. No formal interim analysis of efficacy was planned, and the "
                "committee did not recommend any change to the trial."
            ],
        ),
    ]


def _group(arm: str) -> str:
    """An arm's name after "the" ("an advice leaflet" -> "advice leaflet")."""
    for article in ("a ", "an "):
        if arm.startswith(article):
            return arm[len(article):]
    return arm


def _common_results(t: Trial) -> list[tuple[str, list[str]]]:
    return [
        (
            "Adherence",
            [
                f"Adherence to {t.intervention} was assessed from returned materials and "
                "participant reports. Most participants followed the allocated treatment for "
                "most of the trial period, and adherence was similar at each follow-up visit. "
                f"In the {_group(t.comparator)} group, few participants reported starting "
                "another "
                "treatment for the condition during follow-up."
            ],
        ),
        (
            "Exploratory analyses",
            [
                "Exploratory analyses adjusted for age, sex and baseline severity gave estimates "
                "close to the unadjusted results. Analyses restricted to participants seen "
                "within the planned visit windows gave similar results, as did analyses that "
                "excluded the first recruiting site."
            ],
        ),
    ]


def _common_discussion(t: Trial) -> list[str]:
    return [
        f"Comparison with other studies is limited, because {t.intervention} has not been "
        "evaluated in a randomised trial before. Uncontrolled reports described larger "
        "improvements than we observed, which is expected when there is no control group and "
        "when participants are selected because their symptoms are at a peak.3 Trials of "
        f"other treatments for {t.condition} have reported effects of a similar size, "
        "although outcome measures and follow-up differ between studies.4",
        "Strengths of the trial include its pragmatic eligibility criteria, the use of an "
        "outcome chosen with patients, and a prespecified analysis plan. The number of "
        "participants was close to the planned sample size, and recruitment finished on time.",
        f"For clinicians, the results suggest that {t.intervention} can be offered to people "
        f"with {t.condition} who wish to try it, with a clear explanation of the expected "
        "size of benefit and of the side effects that were reported. For research, the trial "
        "shows that recruitment in this setting is feasible.",
    ]


def _back_matter(t: Trial) -> str:
    return (
        f"{t.funding} Contributors: all authors designed the trial and approved the final "
        "report; the corresponding author had full access to the data. Competing interests: "
        "none declared beyond those stated. Data sharing: de-identified data are available "
        "from the corresponding author on reasonable request, after approval of a proposal."
    )


def _complete(t: Trial) -> Trial:
    from dataclasses import replace

    return replace(
        t,
        extra_methods=_common_methods(t) + t.extra_methods,
        extra_results=t.extra_results + _common_results(t),
        discussion=t.discussion[:1] + _common_discussion(t) + t.discussion[1:],
        funding=_back_matter(t),
        references=t.references + _refs(t.condition, extra=8)[5:],
    )


TRIALS = [_complete(t) for t in (ALDER, BIRCH, CEDAR, DOGWOOD, ELM, FIR, HAZEL, _long_trial())]
