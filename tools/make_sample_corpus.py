#!/usr/bin/python3
"""Writes the demo corpus sample_corpus/ from scratch.

The corpus is the invented archive of The Tessary Lantern, the weekly paper
of the fictional harbour town of Port Tessary, and of three partner outlets
that reprint its stories with new headlines, bylines, trailing notices and
small edits. See sample_corpus/README.md for what is planted where.

Standard library only; deterministic (fixed seed, same bytes on every run
with the same Python 3 minor version). Usage:

    /usr/bin/python3 tools/make_sample_corpus.py [--out sample_corpus]
"""

import argparse
import copy
import datetime
import json
import math
import pathlib
import random
import re
import shutil
import sys

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))

import sample_corpus_notices as notices  # noqa: E402
import sample_corpus_phrases as phrases  # noqa: E402

SEED = 20250314
HOME_PRIORITY = 10
PARTNER_PRIORITY = 5
UNKNOWN_PRIORITY = 1

LEADS = [
    "{Topic} dominated the agenda at {venue} on {weekday}, and the outcome surprised few of the {num2} people who came.",
    "After {num} months of argument, the question of {topic} is finally settled, at least for now.",
    "Residents of {street} were among the first to hear about {topic} this week.",
    "Opinion in {town} has been divided over {topic} since the subject was first raised in {month}.",
    "There was good news and bad news this week for everyone following {topic}.",
    "{official}, this week gave the clearest picture yet of {topic}.",
    "Few subjects have filled the Lantern's letters page like {topic}, and this week brought a decision.",
    "{Topic} took a step forward on {weekday}, to the relief of many in {town}.",
    "Questions about {topic} were raised again on {weekday} by people living near {street}.",
    "It was a week of firsts for {town}, not least because of {topic}.",
]

QUOTE_FORMS = [
    '"{q}," said {official}.',
    '"{q}," {official}, said.',
    '{official}, said: "{q}."',
    '"{q}," {person} told the Lantern.',
    '"{q}," added {person}, who has followed the matter closely.',
]

REPORTERS = ["Maren Penhallow", "Jago Tremayle", "Imogen Scollard",
             "Hamish Rosewarne", "Thea Quillerby"]

TIMES = ["10am", "11am", "2pm", "2.30pm", "6pm", "6.30pm", "7pm", "7.30pm",
         "half past six", "eight o'clock", "nine in the morning"]

# (kind, topic, headline) of stories that arrive as new submissions.
SUBMISSION_TOPICS = [
    ("environment", "the proposed wind turbines off Gull Point",
     "Turbines off Gull Point: a view from the cliff path"),
    ("sport", "the new skatepark on Tollgate Lane",
     "Skatepark on Tollgate Lane is a hit with teenagers"),
    ("arts", "the history society's guided walk of the old town",
     "Walking tour brings the old town's past to life"),
]


class Slots(dict):
    """str.format_map mapping that invents a fresh value for each slot."""

    def __init__(self, rng, kind, topic, paper=phrases.HOME_PAPER):
        super().__init__()
        self.rng, self.kind, self.topic, self.paper = rng, kind, topic, paper

    def __missing__(self, key):
        r = self.rng
        if key in ("person", "person2"):
            return f"{r.choice(phrases.FIRST_NAMES)} {r.choice(phrases.SURNAMES)}"
        simple = {
            "topic": lambda: self.topic,
            "Topic": lambda: self.topic[0].upper() + self.topic[1:],
            "town": lambda: phrases.TOWN,
            "paper": lambda: self.paper,
            "street": lambda: r.choice(phrases.STREETS),
            "venue": lambda: r.choice(phrases.VENUES),
            "business": lambda: r.choice(phrases.BUSINESSES),
            "partner_town": lambda: r.choice(
                [town for _, town in phrases.PARTNERS.values()]),
            "num": lambda: str(r.randint(2, 40)),
            "num2": lambda: str(r.randint(3, 60)),
            "big": lambda: f"{r.randint(120, 4800):,}",
            "money": lambda: f"£{r.randint(12, 980) * r.choice([50, 100, 250]):,}",
            "price": lambda: f"£{r.randint(2, 60)}.{r.choice(['00', '50', '20'])}",
            "percent": lambda: str(r.randint(3, 65)),
            "vote": self._vote,
            "ordinal": lambda: r.choice(["second", "third", "fourth", "fifth",
                                         "sixth", "seventh"]),
            "weekday": lambda: r.choice(phrases.WEEKDAYS),
            "month": lambda: r.choice(phrases.MONTHS),
            "year": lambda: str(r.randint(1952, 2021)),
            "time": lambda: r.choice(TIMES),
            "official": self._official,
        }
        return simple[key]()

    def _vote(self):
        against = self.rng.randint(0, 5)
        return f"{against + self.rng.randint(1, 6)} to {against}"

    def _official(self):
        role = self.rng.choice(phrases.KINDS[self.kind]["roles"])
        return f"{self['person']}, {role.format_map(self)}"

    def fill(self, template):
        return vary(self.rng, template).format_map(self)


VARIANT_PATTERNS = [(re.compile(p), alts) for p, alts in phrases.VARIANTS]


def vary(rng, template):
    """The template with each interchangeable wording picked at random."""
    for pattern, alternatives in VARIANT_PATTERNS:
        template = pattern.sub(lambda _: rng.choice(alternatives), template)
    return template


class Deck:
    """Templates dealt without replacement, reshuffled when used up, so that
    stories drawing from the same deck share as few as possible."""

    def __init__(self, rng, cards):
        self.rng, self.cards, self.left = rng, list(cards), []

    def deal(self, avoid):
        for _ in range(2 * len(self.cards)):
            if not self.left:
                self.left = self.rng.sample(self.cards, len(self.cards))
            card = self.left.pop()
            if card not in avoid:
                return card
        return None


class Decks:
    """One deck of facts and one of quotes per kind of story, and one deck of
    general sentences, shared by all the stories of a corpus."""

    def __init__(self, rng):
        self.facts = {k: Deck(rng, v["facts"]) for k, v in phrases.KINDS.items()}
        self.quotes = {k: Deck(rng, v["quotes"])
                       for k, v in phrases.KINDS.items()}
        self.generic = Deck(rng, phrases.GENERIC)


class Sentence:
    def __init__(self, template, text, role):
        self.template, self.text, self.role = template, text, role


class Story:
    """A news story: headline, byline, date line and paragraphs of sentences."""

    def __init__(self, kind, topic, headline, alt_headline, byline, dateline):
        self.kind, self.topic = kind, topic
        self.headline, self.alt_headline = headline, alt_headline
        self.byline, self.dateline = byline, dateline
        self.paragraphs = []  # list of lists of Sentence
        self.notice = None

    def text(self):
        parts = [self.headline, "", self.byline, self.dateline, ""]
        parts.append("\n\n".join(" ".join(s.text for s in p)
                                 for p in self.paragraphs))
        if self.notice:
            parts += ["", self.notice]
        return "\n".join(parts) + "\n"


def word_count(sentences):
    return sum(len(s.text.split()) for s in sentences)


def quote_sentence(slots, body, avoid=None):
    form = slots.rng.choice([f for f in QUOTE_FORMS if f != avoid])
    sentence = Sentence(form, form.format_map(_with(slots, q=body)), "quote")
    sentence.quote = body
    return sentence


def _with(slots, **fixed):
    merged = Slots(slots.rng, slots.kind, slots.topic, slots.paper)
    merged.update(fixed)
    return merged


def body_sentences(rng, slots, decks, target_words):
    """Facts, quotes and general sentences in story order, about
    target_words long."""
    out, used, quotes = [], set(), 0
    while word_count(out) < target_words:
        pick = rng.random()
        if pick < 0.2 and quotes < 2:
            body = decks.quotes[slots.kind].deal(used)
            if body:
                out.append(quote_sentence(slots, body))
                used.add(body)
                quotes += 1
            continue
        deck, role = ((decks.facts[slots.kind], "fact") if pick < 0.65
                      else (decks.generic, "generic"))
        t = deck.deal(used)
        if t is None:
            break
        used.add(t)
        out.append(Sentence(t, slots.fill(t), role))
    return out


def into_paragraphs(rng, lead, sentences):
    paragraphs = [[lead]]
    i = 0
    while i < len(sentences):
        if sentences[i].role == "quote":
            size = rng.choice([1, 2])
        else:
            size = rng.choice([1, 2, 2, 3, 3])
        paragraphs.append(sentences[i:i + size])
        i += size
    return paragraphs


def make_story(rng, decks, kind, topic, headline, alt_headline, date):
    slots = Slots(rng, kind, topic)
    byline = f"By {rng.choice(REPORTERS)}"
    story = Story(kind, topic, headline, alt_headline, byline, date_line(date))
    story.date = date
    lead_t = rng.choice(LEADS)
    lead = Sentence(lead_t, slots.fill(lead_t), "lead")
    target = rng.randint(170, 560)
    story.paragraphs = into_paragraphs(
        rng, lead, body_sentences(rng, slots, decks, target))
    return story


def date_line(date):
    return f"{date.day} {phrases.MONTHS[date.month - 1]} {date.year}"


def slug(text, words=6):
    kept = "".join(c.lower() if c.isalnum() else " " for c in text).split()
    return "-".join(kept[:words])


def doc(doc_id, text, outlet, priority):
    return {"id": doc_id, "text": text, "outlet": outlet, "priority": priority}


# ---------------------------------------------------------------------------
# Reprints by partner outlets.

# How heavily each partner reprint is edited: sentences changed, paragraphs
# dropped, a local paragraph added, only the first part printed.
REPRINT_PLANS = [
    {"how": "new headline, byline and notice"},
    {"how": "new headline, byline, notice; 1 sentence changed", "changes": 1},
    {"how": "new headline, byline, notice; 2 sentences changed",
     "changes": 2},
    {"how": "new headline, byline, notice; 2 sentences changed; local "
     "paragraph added", "changes": 2, "local": True},
    {"how": "new headline, byline, notice; 1 paragraph dropped", "drops": 1},
    {"how": "new headline, byline, notice; 3 sentences changed; 1 paragraph "
     "dropped", "changes": 3, "drops": 1},
    {"how": "new headline, byline, notice; 4 sentences changed; 1 paragraph "
     "dropped; local paragraph added", "changes": 4, "drops": 1,
     "local": True},
    {"how": "new headline, byline, notice; 5 sentences changed; 2 "
     "paragraphs dropped", "changes": 5, "drops": 2},
    {"how": "new headline, byline, notice; only the first half printed",
     "keep": 0.5},
]

# Which plan each of the 27 reprints follows: mostly light edits, a few
# heavy ones.
REPRINT_SCHEDULE = [0, 1, 2, 0, 1, 3, 4, 0, 2, 1, 5, 0, 3, 1, 6, 2, 0, 4, 1,
                    7, 0, 2, 8, 1, 3, 0, 5]


def change_sentence(rng, slots, sentence):
    """A small edit: a quote attributed differently, or a sentence with its
    names and numbers changed, or one rewritten from scratch."""
    if sentence.role == "quote":
        return quote_sentence(slots, sentence.quote, avoid=sentence.template)
    template = sentence.template
    if rng.random() < 0.3:
        template = rng.choice(phrases.GENERIC)
    for _ in range(20):
        text = slots.fill(template)
        if text != sentence.text:
            return Sentence(template, text, sentence.role)
    return Sentence(template, text + " Details may change.", sentence.role)


def edit_story(rng, story, slots, plan):
    paragraphs = story.paragraphs
    if "keep" in plan:
        paragraphs = paragraphs[:max(2, int(len(paragraphs) * plan["keep"]))]
    for _ in range(plan.get("drops", 0)):
        if len(paragraphs) > 3:
            del paragraphs[rng.randrange(1, len(paragraphs))]
    places = [(p, s) for p in range(1, len(paragraphs))
              for s in range(len(paragraphs[p]))]
    for p, s in rng.sample(places, min(plan.get("changes", 0), len(places))):
        paragraphs[p][s] = change_sentence(rng, slots, paragraphs[p][s])
    if plan.get("local"):
        t = rng.choice(phrases.LOCAL_ANGLES)
        paragraphs.insert(len(paragraphs) - 1,
                          [Sentence(t, slots.fill(t), "generic")])
    story.paragraphs = paragraphs


def reprint(rng, story, outlet, plan):
    """A partner outlet's reprint of `story` edited as `plan` says."""
    paper, _ = phrases.PARTNERS[outlet]
    copy_ = copy.deepcopy(story)
    slots = Slots(rng, story.kind, story.topic, paper)
    copy_.headline = story.alt_headline
    copy_.byline = slots.fill(rng.choice(phrases.REPRINT_BYLINES))
    copy_.date = story.date + datetime.timedelta(days=rng.randint(3, 12))
    copy_.dateline = date_line(copy_.date)
    edit_story(rng, copy_, slots, plan)
    copy_.notice = slots.fill(rng.choice(phrases.REPRINT_NOTICES))
    return copy_


# ---------------------------------------------------------------------------
# The archive.

class Corpus:
    """Documents of the archive, planted pairs and the editor's labels."""

    def __init__(self):
        self.docs = {}        # id -> doc dict (text is str or bytes)
        self.planted = []     # (a, b, how)
        self.labels = []      # (a, b, "duplicate" | "distinct")

    def add(self, doc_id, text, outlet, priority):
        assert doc_id not in self.docs, doc_id
        self.docs[doc_id] = doc(doc_id, text, outlet, priority)
        return doc_id

    def plant(self, a, b, how, label="duplicate"):
        self.planted.append((a, b, how))
        self.labels.append((a, b, label))


def home_stories(rng, corpus):
    """One story per topic, dated between January 2023 and June 2025."""
    stories, decks = [], Decks(rng)
    start = datetime.date(2023, 1, 2)
    for kind, spec in phrases.KINDS.items():
        for topic, headline, alt in spec["topics"]:
            date = start + datetime.timedelta(days=rng.randint(0, 900))
            story = make_story(rng, decks, kind, topic, headline, alt, date)
            story.id = corpus.add(
                f"{date.year}/{date.month:02d}/{slug(headline)}.txt",
                story.text(), phrases.HOME_PAPER, HOME_PRIORITY)
            stories.append(story)
    return stories


def partner_id(outlet, story):
    return (f"partners/{outlet}/{story.date.year}/"
            f"{story.date.month:02d}-{slug(story.headline)}.txt")


def plant_reprints(rng, corpus, stories):
    """Partner reprints at every edit level, three reprinted again by a
    second partner, and three exact copies."""
    outlets = sorted(phrases.PARTNERS)
    chosen = rng.sample(stories, 30)
    reprints = []
    for i, story in enumerate(chosen[:len(REPRINT_SCHEDULE)]):
        plan = REPRINT_PLANS[REPRINT_SCHEDULE[i]]
        outlet = outlets[i % len(outlets)]
        copy_ = reprint(rng, story, outlet, plan)
        copy_.id = corpus.add(partner_id(outlet, copy_), copy_.text(),
                              phrases.PARTNERS[outlet][0], PARTNER_PRIORITY)
        corpus.plant(story.id, copy_.id, f"reprint: {plan['how']}")
        reprints.append((outlet, story, copy_))
    for outlet, story, first in reprints[1:8:3]:
        other = outlets[(outlets.index(outlet) + 1) % len(outlets)]
        second = reprint(rng, first, other, REPRINT_PLANS[1])
        second.id = corpus.add(partner_id(other, second), second.text(),
                               phrases.PARTNERS[other][0], PARTNER_PRIORITY)
        corpus.plant(first.id, second.id,
                     f"reprint of a reprint: {REPRINT_PLANS[1]['how']}")
        corpus.labels.append((story.id, second.id, "duplicate"))
    plant_exact_copies(corpus, chosen[len(REPRINT_SCHEDULE):])


def plant_exact_copies(corpus, stories):
    refiled, wire, odd = stories
    month = refiled.date.month % 12 + 1
    year = refiled.date.year + (refiled.date.month == 12)
    twin = corpus.add(f"{year}/{month:02d}/{slug(refiled.headline)}.txt",
                      refiled.text(), phrases.HOME_PAPER, HOME_PRIORITY)
    corpus.plant(refiled.id, twin, "exact copy: filed again a month later")
    outlet = "orrin-valley-weekly"
    copy_id = corpus.add(partner_id(outlet, wire), wire.text(),
                         phrases.PARTNERS[outlet][0], PARTNER_PRIORITY)
    corpus.plant(wire.id, copy_id, "exact copy: printed verbatim by a partner")
    crlf = corpus.add("odd/crlf-line-endings.txt",
                      odd.text().replace("\n", "\r\n").encode(),
                      "unknown", UNKNOWN_PRIORITY)
    corpus.plant(odd.id, crlf, "same text with CRLF line endings")


# ---------------------------------------------------------------------------
# Templated notices: the same template with a few fields swapped.

CLERK = "Keziah Mewton"
TOWN_HALL = "the council chamber at the Town Hall"


def plant_council_notices(corpus):
    items = notices.AGENDA_ITEMS
    c = notices.COMMITTEES
    specs = [  # (id suffix, committee, date, time, venue, item indexes)
        ("2024-03-12-planning", c[0], "Tuesday 12 March 2024", "7pm",
         TOWN_HALL, [0, 1, 2]),
        ("2024-04-09-planning", c[0], "Tuesday 9 April 2024", "7pm",
         TOWN_HALL, [1, 3, 17]),
        ("2024-03-19-finance", c[1], "Tuesday 19 March 2024", "6.30pm",
         TOWN_HALL, [4, 5, 13]),
        ("2024-04-16-finance", c[1], "Tuesday 16 April 2024", "6.30pm",
         TOWN_HALL, [4, 5, 13]),
        ("2024-05-21-finance", c[1], "Tuesday 21 May 2024", "6.30pm",
         TOWN_HALL, [4, 6, 7]),
        ("2024-05-02-harbour", c[2], "Thursday 2 May 2024", "7pm",
         "the harbour office", [8, 9, 11]),
        ("2024-05-28-full-council", c[3], "Tuesday 28 May 2024", "7pm",
         TOWN_HALL, [10, 14, 15, 16]),
    ]
    ids = {}
    for suffix, committee, date, time, venue, idx in specs:
        text = notices.council_notice(committee, date, time, venue,
                                      [items[i] for i in idx], CLERK)
        ids[suffix] = corpus.add(f"notices/council/{suffix}.txt", text,
                                 phrases.HOME_PAPER, HOME_PRIORITY)
    amended = notices.council_notice(
        c[0], "Tuesday 12 March 2024", "7.30pm",
        "the Seafarers' Institute", [items[i] for i in (0, 1, 2)], CLERK,
        amended=" (AMENDED: NEW TIME AND PLACE)")
    a = corpus.add("notices/council/2024-03-12-planning-amended.txt",
                   amended, phrases.HOME_PAPER, HOME_PRIORITY)
    corpus.plant(ids["2024-03-12-planning"], a,
                 "council notice reissued with a new time and place")
    outlet = "fennmouth-gazette"
    text = ("NOTICES FROM OUR NEIGHBOURS\n\n"
            + corpus.docs[ids["2024-05-28-full-council"]]["text"]
            + "\nPrinted at the request of Tessary Town Council.\n")
    p = corpus.add(f"partners/{outlet}/notices/2024-05-28-tessary-council.txt",
                   text, phrases.PARTNERS[outlet][0], PARTNER_PRIORITY)
    corpus.plant(ids["2024-05-28-full-council"], p,
                 "council notice printed by a partner with a heading")
    corpus.labels += [
        (ids["2024-03-19-finance"], ids["2024-04-16-finance"], "distinct"),
        (ids["2024-04-16-finance"], ids["2024-05-21-finance"], "distinct"),
        (ids["2024-03-12-planning"], ids["2024-04-09-planning"], "distinct"),
        (ids["2024-05-02-harbour"], ids["2024-05-28-full-council"],
         "distinct"),
    ]


def tidal_ranges(first_day):
    """Spring-neap cycle of 14.77 days (the mean synodic half-month)."""
    return [round(3.3 + 1.1 * math.cos(2 * math.pi * (first_day + d) / 14.77),
                  1) for d in range(7)]


def plant_tide_tables(corpus):
    start = datetime.date(2024, 6, 3)
    sun = [("05:01", "21:30"), ("04:58", "21:36"), ("04:57", "21:40"),
           ("04:59", "21:41"), ("05:03", "21:39"), ("05:08", "21:35")]
    ids = []
    for week in range(6):
        monday = start + datetime.timedelta(days=7 * week)
        text = notices.tide_table(
            f"Monday {date_line(monday)}", 252 + 350 * week,
            tidal_ranges(7 * week), *sun[week])
        ids.append(corpus.add(f"notices/tides/{monday.isoformat()}.txt",
                              text, phrases.HOME_PAPER, HOME_PRIORITY))
    original = corpus.docs[ids[1]]["text"]
    lines = original.split("\n")
    thursday = next(i for i, l in enumerate(lines) if l.startswith("Thursday"))
    lines[thursday] = notices.tide_day("Thursday", 252 + 350 + 3 * 50 + 7,
                                       tidal_ranges(10)[0] + 0.1)
    corrected = ("CORRECTED TABLE\n\n" + "\n".join(lines)
                 + "\nLast week's table gave the wrong times for Thursday; "
                 "the corrected times are printed above.\n")
    fixed = corpus.add("notices/tides/2024-06-10-corrected.txt", corrected,
                       phrases.HOME_PAPER, HOME_PRIORITY)
    corpus.plant(ids[1], fixed, "tide table reprinted with one day corrected")
    outlet = "fennmouth-gazette"
    copy_id = corpus.add(f"partners/{outlet}/notices/tides-2024-06-24.txt",
                         corpus.docs[ids[3]]["text"],
                         phrases.PARTNERS[outlet][0], PARTNER_PRIORITY)
    corpus.plant(ids[3], copy_id, "exact copy: tide table printed by a partner")
    corpus.labels += [(ids[0], ids[1], "distinct"),
                      (ids[2], ids[3], "distinct"),
                      (ids[0], ids[2], "distinct")]


OBITUARY_PEOPLE = [  # first, surname, pronoun, age, street
    ("Morwen", "Carnsew", "she", 87, "Netmakers' Row"),
    ("Wilfred", "Hocking", "he", 92, "Beacon Terrace"),
    ("Lowenna", "Jewell", "she", 78, "Chapel Brow"),
    ("Edmund", "Pengarth", "he", 81, "Windlass Street"),
    ("Bronwen", "Tolvaddon", "she", 95, "Orchard Steps"),
]


def obituary_fields(rng, person, index):
    first, surname, pronoun, age, street = person
    death = datetime.date(2024, 2, 1) + datetime.timedelta(days=23 * index)
    funeral = death + datetime.timedelta(days=rng.randint(9, 16))
    life2 = [s for s in notices.OBIT_LIFE2 if s.startswith(
        "He" if pronoun == "he" else "She")]
    children = rng.randint(2, 4)
    return {
        "name": f"{first} {surname}", "first": first, "street": street,
        "place_of_death": notices.OBIT_PLACES[index % 4],
        "death_date": date_line(death), "age": age,
        "birthplace": notices.OBIT_BIRTHPLACES[index],
        "birth_year": death.year - age, "life1": notices.OBIT_LIFE1[index],
        "life2": rng.choice(life2), "pronoun_cap": pronoun.capitalize(),
        "hobby": notices.OBIT_HOBBIES[index],
        "family": f"{children} children, {children * 2 + 1} grandchildren "
                  f"and a great many friends on the quay",
        "funeral_date": date_line(funeral), "time": rng.choice(TIMES[:4]),
    }


def plant_obituaries(rng, corpus):
    ids, fields = [], []
    for i, person in enumerate(OBITUARY_PEOPLE):
        f = obituary_fields(rng, person, i)
        fields.append(f)
        ids.append(corpus.add(f"notices/obituaries/{slug(f['name'])}.txt",
                              notices.obituary(f), phrases.HOME_PAPER,
                              HOME_PRIORITY))
    outlet = "brannock-courier"
    f = dict(fields[1], family=fields[1]["family"] + ", among them many in "
             "Brannock, where he worked as a young man")
    text = ("DEATHS\n\n" + notices.obituary(f)
            + "\nThis notice first appeared in The Tessary Lantern.\n")
    p = corpus.add(f"partners/{outlet}/notices/{slug(f['name'])}.txt", text,
                   phrases.PARTNERS[outlet][0], PARTNER_PRIORITY)
    corpus.plant(ids[1], p, "obituary reprinted by a partner, family line "
                 "extended")
    f = dict(fields[3], funeral_date=date_line(
        datetime.date(2024, 4, 26)), time="2.30pm")
    text = notices.obituary(f) + ("\nThis notice corrects the date and time "
                                  "of the funeral given last week.\n")
    c = corpus.add(f"notices/obituaries/{slug(f['name'])}-corrected.txt",
                   text, phrases.HOME_PAPER, HOME_PRIORITY)
    corpus.plant(ids[3], c, "obituary corrected: funeral date and time")
    corpus.labels += [(ids[0], ids[2], "distinct"), (ids[1], ids[3],
                                                     "distinct"),
                      (ids[2], ids[4], "distinct")]


def plant_lost_pets(corpus):
    pets = notices.PETS
    owners = [("Ewan Nute", "07700 900412"), ("Greer Kellow", "07700 900157"),
              ("Noel Vosper", "07700 900833"), ("Ottilie Grylls",
                                                "07700 900264"),
              ("Silas Eddowes", "07700 900590"), ("Frida Yeoland",
                                                  "07700 900721")]
    streets = ["Gannet Street", "Harrow Hill", "Millrace Lane", "Capstan Square",
               "Tollgate Lane", "Wherry Lane"]
    ids = []
    for i, pet in enumerate(pets):
        text = notices.lost_pet(pet, 2 + i, phrases.WEEKDAYS[i], 3 + 4 * i,
                                "June", streets[i], *owners[i])
        ids.append(corpus.add(f"notices/lost-pets/2024-06-{3 + 4 * i:02d}-"
                              f"{pet[0].lower()}.txt", text,
                              phrases.HOME_PAPER, HOME_PRIORITY))
    again = notices.lost_pet(
        pets[0], 2, "Monday", 3, "June", streets[0], *owners[0],
        heading="STILL MISSING: BISCUIT",
        extra=" He may have been seen on Kelp Yard late on Friday evening, "
              "and a neighbour heard a cat crying near the boatyard sheds.",
        reward="The reward has been doubled.")
    a = corpus.add("notices/lost-pets/2024-06-14-biscuit-still-missing.txt",
                   again, phrases.HOME_PAPER, HOME_PRIORITY)
    corpus.plant(ids[0], a, "lost-pet notice reposted with a sighting added")
    moved = notices.lost_pet(pets[2], 4, "Wednesday", 11, "June", streets[2],
                             owners[2][0], "07700 900834")
    b = corpus.add("notices/lost-pets/2024-06-18-pepper.txt", moved,
                   phrases.HOME_PAPER, HOME_PRIORITY)
    corpus.plant(ids[2], b, "lost-pet notice reposted with a new phone number")
    outlet = "orrin-valley-weekly"
    text = corpus.docs[ids[1]]["text"] + ("\nMabel has relatives in Orrin "
                                          "Valley and may be trying to "
                                          "walk there.\n")
    c = corpus.add(f"partners/{outlet}/notices/lost-dog-mabel.txt", text,
                   phrases.PARTNERS[outlet][0], PARTNER_PRIORITY)
    corpus.plant(ids[1], c, "lost-pet notice printed by a partner with a "
                 "line added")
    corpus.labels += [(ids[2], ids[5], "distinct"), (ids[0], ids[5],
                                                     "distinct"),
                      (ids[3], ids[4], "distinct")]


# ---------------------------------------------------------------------------
# Other scripts and awkward files.

def plant_twin_towns(corpus):
    ids = []
    for lang, (paper, original, edited) in notices.TWIN_STORIES.items():
        a = corpus.add(f"twins/{lang}/fishermen-visit.txt", original, paper,
                       PARTNER_PRIORITY)
        b = corpus.add(f"twins/{lang}/fishermen-visit-reprint.txt", edited,
                       phrases.HOME_PAPER, HOME_PRIORITY)
        corpus.plant(a, b, f"reprint in {lang}: new headline, a number "
                     "changed, notice added")
        ids.append(a)
    corpus.labels += [(ids[0], ids[2], "distinct")]


# Invalid UTF-8 put between and inside words: a lone continuation byte, a
# truncated two-byte and three-byte sequence, an overlong encoding of "/",
# an encoded surrogate, and bytes that are never valid (RFC 3629 section 3).
BROKEN_BYTES = [b"\x80", b"\xc3", b"\xe2\x82", b"\xc0\xaf", b"\xed\xa0\x80",
                b"\xff\xfe"]


def plant_awkward(rng, corpus, story):
    corpus.add("odd/empty.txt", b"", "unknown", UNKNOWN_PRIORITY)
    corpus.add("odd/one-word.txt", "Untitled\n", "unknown", UNKNOWN_PRIORITY)
    words = story.text().encode().split(b" ")
    spots = sorted(rng.sample(range(20, len(words) - 5), len(BROKEN_BYTES)))
    for spot, bad in zip(spots, BROKEN_BYTES):
        if spot % 2:
            words[spot] = bad  # replaces a whole word
        else:
            cut = len(words[spot]) // 2
            words[spot] = words[spot][:cut] + bad + words[spot][cut:]
    broken = corpus.add("odd/broken-utf8.txt", b" ".join(words), "unknown",
                        UNKNOWN_PRIORITY)
    corpus.plant(story.id, broken, "copy with invalid UTF-8 bytes in six "
                 "places")
    corpus.labels.append(("odd/empty.txt", "odd/one-word.txt", "distinct"))


def label_distinct_stories(rng, corpus, stories):
    """Pairs an editor marks distinct: same kind of story (shared
    vocabulary), and different kinds."""
    by_kind = {}
    for s in stories:
        by_kind.setdefault(s.kind, []).append(s)
    for kind in sorted(by_kind):
        a, b = rng.sample(by_kind[kind], 2)
        corpus.labels.append((a.id, b.id, "distinct"))
    for _ in range(6):
        a, b = rng.sample(stories, 2)
        if a.kind != b.kind:
            corpus.labels.append((a.id, b.id, "distinct"))


# ---------------------------------------------------------------------------
# New reader submissions to check against the archive.

def submissions(rng, stories, pet_notice):
    """Returns ({file name: text}, [(file name, archive id, how)])."""
    out = dict(notices.LETTERS)
    out.update(notices.EVENTS)
    matches = []
    benches = notices.LETTERS["letter-seafront-benches.txt"]
    out["letter-seafront-benches-again.txt"] = (
        benches.replace("Sir,", "Dear Editor,") + "\nP.S. I sent this letter "
        "last month but have not seen it printed.\n")
    resubmitted, copied, lifted = stories
    edited = copy.deepcopy(resubmitted)
    edited.headline, edited.byline = edited.alt_headline, "By a reader"
    edit_story(rng, edited, Slots(rng, edited.kind, edited.topic),
               {"changes": 2})
    out["story-resubmitted.txt"] = edited.text()
    matches.append(("story-resubmitted.txt", resubmitted.id,
                    "resubmitted with a new headline and 2 sentences changed"))
    text = copied.text().replace(copied.byline, "By Corin Ashgrove", 1)
    out["story-copied.txt"] = text.replace(" the ", " a ", 1)
    matches.append(("story-copied.txt", copied.id,
                    "copied almost verbatim: byline and one word changed"))
    decks = Decks(rng)
    fresh = [make_story(rng, decks, kind, topic, headline, headline,
                        datetime.date(2025, 7, 1))
             for kind, topic, headline in SUBMISSION_TOPICS]
    fresh[0].paragraphs[2:2] = copy.deepcopy(lifted.paragraphs[1:-1])
    out["story-wind-turbines.txt"] = fresh[0].text()
    matches.append(("story-wind-turbines.txt", lifted.id,
                    "own story with most of an archive story pasted in"))
    out["story-skatepark.txt"] = fresh[1].text()
    out["story-history-walk.txt"] = fresh[2].text()
    out["lost-cat-sooty.txt"] = notices.lost_pet(
        notices.PETS[5], 7, "Friday", 21, "June", "the Ropewalk",
        "Frida Yeoland", "07700 900721", heading="LOST: SOOTY, PLEASE HELP")
    matches.append(("lost-cat-sooty.txt", pet_notice,
                    "lost-pet notice resent with the street and heading "
                    "changed"))
    ja = notices.TWIN_STORIES["ja"][1]
    out["twin-visit-ja.txt"] = ja.replace("十日間の日程で町に滞在する。",
                                          "十日間ほど町に滞在する予定だ。")
    matches.append(("twin-visit-ja.txt", "twins/ja/fishermen-visit.txt",
                    "one sentence changed"))
    return out, matches


# ---------------------------------------------------------------------------
# Assembly and output.

def build(rng):
    corpus = Corpus()
    stories = home_stories(rng, corpus)
    plant_reprints(rng, corpus, stories)
    plant_council_notices(corpus)
    plant_tide_tables(corpus)
    plant_obituaries(rng, corpus)
    plant_lost_pets(corpus)
    plant_twin_towns(corpus)
    used = {a for a, _, _ in corpus.planted}
    spare = [s for s in stories if s.id not in used]
    plant_awkward(rng, corpus, spare[0])
    label_distinct_stories(rng, corpus, stories)
    sent, matches = submissions(rng, spare[1:4],
                                "notices/lost-pets/2024-06-23-sooty.txt")
    return corpus, sent, matches


def as_bytes(text):
    return text if isinstance(text, bytes) else text.encode("utf-8")


def write_tree(root, files):
    for rel, text in sorted(files.items()):
        path = root / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(as_bytes(text))


def jsonl_line(d):
    text = d["text"]
    if isinstance(text, bytes):  # JSON holds Unicode: bad bytes become U+FFFD
        text = text.decode("utf-8", errors="replace")
    record = {"id": d["id"], "text": text, "priority": d["priority"],
              "outlet": d["outlet"]}
    return json.dumps(record, ensure_ascii=False) + "\n"


def tsv(header, rows):
    return "".join("\t".join(map(str, r)) + "\n" for r in [header] + rows)


def write_corpus(out, corpus, sent, matches):
    write_tree(out / "archive", {i: d["text"] for i, d in corpus.docs.items()})
    write_tree(out / "submissions", sent)
    (out / "archive.jsonl").write_text(
        "".join(jsonl_line(corpus.docs[i]) for i in sorted(corpus.docs)),
        encoding="utf-8")
    (out / "labels.tsv").write_text(
        tsv(("a", "b", "label"), corpus.labels), encoding="utf-8")
    (out / "planted.tsv").write_text(
        tsv(("a", "b", "how"), corpus.planted), encoding="utf-8")
    (out / "submissions_expected.tsv").write_text(
        tsv(("submission", "archive_id", "how"), matches), encoding="utf-8")
    readme = pathlib.Path(__file__).with_name("sample_corpus_readme.md")
    counts = {
        "archive": len(corpus.docs), "submissions": len(sent),
        "labels": len(corpus.labels), "planted": len(corpus.planted),
        "duplicates": sum(1 for l in corpus.labels if l[2] == "duplicate"),
    }
    (out / "README.md").write_text(readme.read_text(encoding="utf-8")
                                   .format(**counts), encoding="utf-8")


def clear(out):
    """Removes a previous corpus; refuses to touch anything else."""
    if not out.exists():
        return
    known = {"archive", "submissions", "archive.jsonl", "labels.tsv",
             "planted.tsv", "submissions_expected.tsv", "README.md"}
    kept = {"crawl"}  # the crawl archive of tools/make_sample_crawl.py stays
    strangers = [p.name for p in out.iterdir() if p.name not in known | kept]
    if strangers:
        sys.exit(f"{out}: not a sample corpus (found {strangers[0]})")
    for p in out.iterdir():
        if p.name in kept:
            continue
        if p.is_dir():
            shutil.rmtree(p)
        else:
            p.unlink()


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    default = pathlib.Path(__file__).resolve().parent.parent / "sample_corpus"
    parser.add_argument("--out", type=pathlib.Path, default=default,
                        help="output directory, replaced whole "
                             "(default: %(default)s)")
    args = parser.parse_args()
    corpus, sent, matches = build(random.Random(SEED))
    clear(args.out)
    args.out.mkdir(parents=True, exist_ok=True)
    write_corpus(args.out, corpus, sent, matches)
    print(f"wrote {len(corpus.docs)} archive documents, {len(sent)} "
          f"submissions, {len(corpus.labels)} labelled pairs to {args.out}")


if __name__ == "__main__":
    main()
