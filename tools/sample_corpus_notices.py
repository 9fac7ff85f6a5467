"""Notice templates, twin-town stories and reader letters for
tools/make_sample_corpus.py. All invented (see sample_corpus_phrases.py)."""

COMMITTEES = [
    "Planning Committee",
    "Finance and General Purposes Committee",
    "Harbour and Seafront Committee",
    "full Town Council",
]

AGENDA_ITEMS = [
    "Application to convert the former net loft on Kelp Yard into two flats.",
    "Application for a balcony at 14 Beacon Terrace.",
    "Application to replace the shop front of 3 Lower Fore Street.",
    "Consultation on the county's draft coastal management plan.",
    "Accounts for payment and the monthly bank reconciliation.",
    "Quarterly review of the budget against spending.",
    "Quotation for resurfacing the car park behind the Town Hall.",
    "Renewal of the insurance for the council's buildings and boats.",
    "Report of the harbour master on winter moorings.",
    "Proposal to extend the seafront dog ban to the whole of Long Strand.",
    "Request from the Tessary Festival for use of Capstan Square.",
    "Report on the condition of the seawall steps at Quayside Parade.",
    "Allotment rents for the coming year.",
    "Grant applications from local groups.",
    "Christmas lights: report of the working party.",
    "Appointment of a member to the lifeboat liaison panel.",
    "Response to the consultation on bus services to Brannock.",
    "Tree works in the churchyard of St Brannoc's.",
]

COUNCIL_NOTICE = """TESSARY TOWN COUNCIL

NOTICE OF MEETING{amended}

The {committee} of Tessary Town Council will meet on {date} at {time} in {venue}.

Members of the public are welcome to attend. Up to fifteen minutes will be set aside at the start of the meeting for questions from residents, which should be sent to the town clerk at least two working days beforehand.

AGENDA

1. Apologies for absence.
2. Declarations of interest.
3. Minutes of the previous meeting.
{items}
{n_corr}. Correspondence.
{n_next}. Date of the next meeting.

Papers for the meeting may be inspected at the Town Hall on Gannet Street between ten and four on weekdays.

{clerk}, Town Clerk
"""

TIDE_HEADER = """PORT TESSARY TIDE TIMES

Week beginning {date}. Times are local; heights are in metres above chart datum.
"""

TIDE_FOOTER = """Sunrise {sunrise}, sunset {sunset} on {first_day}.

Tide times are predictions and may be changed by wind and air pressure. The harbour office on Cooper's Wharf can advise on local conditions.
"""

OBITUARY = """{name}

{name}, of {street}, Port Tessary, died peacefully {place_of_death} on {death_date}, aged {age}.

Born in {birthplace} in {birth_year}, {first} {life1} {life2} {pronoun_cap} {hobby}

{pronoun_cap} leaves {family}.

The funeral will take place at St Brannoc's church on {funeral_date} at {time}, followed by burial at Harrow Hill cemetery. Family flowers only; donations in memory of {first}, if desired, to the Tessary lifeboat, care of Pellow and Sons, funeral directors, Chapel Brow.
"""

OBIT_PLACES = ["at home", "in the care of Seaview House",
               "at the cottage hospital", "surrounded by family"]
OBIT_BIRTHPLACES = ["the town", "a farm above Harrow Hill", "Brannock",
                    "a cottage on Netmakers' Row", "Fennmouth",
                    "the coastguard cottages at Gull Point"]
OBIT_LIFE1 = [
    "went to sea at fifteen on her uncle's crabber and later skippered her own boat for thirty years.",
    "trained as a shipwright at Pellow's boatyard and built more than forty wooden boats.",
    "taught at Tessary Primary School for thirty-two years, many of them as deputy head.",
    "ran the bakery on Gannet Street with his brother until they retired together.",
    "served as a nurse at Quayside Surgery and was known to three generations of patients.",
    "kept the post office on Upper Fore Street and never missed a morning in forty years.",
]
OBIT_LIFE2 = [
    "He joined the lifeboat crew in his twenties and served as second coxswain.",
    "She sang alto with the choral society for more than half a century.",
    "He was a town councillor for two terms and chaired the harbour board.",
    "She organised the lantern procession for many years and made hundreds of lanterns.",
    "He was treasurer of the gig rowing club and rarely missed a regatta.",
    "She wrote a weekly nature column for the Lantern under the name Seawatcher.",
]
OBIT_HOBBIES = [
    "loved her garden above the harbour and grew prize dahlias.",
    "was a keen fisherman from the rocks at Gull Point in all weathers.",
    "walked the coastal path every morning with a succession of spaniels.",
    "played the accordion at every wedding in the town for decades.",
    "collected old photographs of the harbour and gave many to the library.",
    "was happiest at the tiller of a small boat on a summer evening.",
]

LOST_PET = """{heading}

{name}, a {age}-year-old {description}, has been missing since {weekday} {day} {month} from near {street}. {pronoun_cap} is {trait}, and answers to {possessive} name. {pronoun_cap} {collar}.{extra}

Please check sheds, garages and boats. If you have seen {name}, please call {owner} on {phone} at any hour. {reward}
"""

PETS = [
    # name, description, pronoun, possessive, trait, collar
    ("Biscuit", "ginger and white tomcat", "he", "his",
     "friendly but nervous of dogs", "wears a blue collar with a bell"),
    ("Mabel", "black Labrador bitch", "she", "her",
     "greying around the muzzle and a little deaf", "has a red collar and a tag"),
    ("Pepper", "black cat with one white paw", "she", "her",
     "small and very shy", "is microchipped but wears no collar"),
    ("Captain", "grey parrot", "he", "his",
     "talkative and likely to whistle at passers-by", "has a ring on his left leg"),
    ("Nutmeg", "brown and white rabbit", "she", "her",
     "tame and used to being handled", "has a notch in one ear"),
    ("Sooty", "black cat with a white bib", "he", "his",
     "large and very vocal", "wears a green collar"),
]

# Twin-town stories: (folder, outlet, original, lightly edited reprint).
TWIN_STORIES = {
    "el": (
        "Η Φωνή του Ταμαριού",
        """Ψαράδες από το Πορτ Τέσαρι επισκέφθηκαν το Πόρτο Ταμάρι

Δώδεκα ψαράδες από την αδελφοποιημένη πόλη Πορτ Τέσαρι έφτασαν την Παρασκευή στο λιμάνι μας για τη γιορτή της σαρδέλας. Ο δήμαρχος τους υποδέχθηκε στην προβλήτα και τους ευχαρίστησε για το δώρο τους, ένα παλιό ξύλινο τιμόνι από το σκάφος διάσωσης της πόλης τους.

Το απόγευμα οι επισκέπτες έμαθαν να μπαλώνουν δίχτυα μαζί με τους ντόπιους ψαράδες, και το βράδυ χόρεψαν στην πλατεία ως τα μεσάνυχτα. «Νιώσαμε σαν στο σπίτι μας», είπε ο επικεφαλής της ομάδας, Τομπάιας Πενχάλοου.

Η γιορτή της σαρδέλας γίνεται κάθε καλοκαίρι από το 1952 και φέτος συγκέντρωσε περισσότερους από δύο χιλιάδες επισκέπτες. Του χρόνου σειρά έχουμε εμείς: τριάντα κάτοικοι του Πόρτο Ταμάρι θα ταξιδέψουν τον Σεπτέμβριο στο Πορτ Τέσαρι.
""",
        """Φιλοξενία για τους ψαράδες του Πορτ Τέσαρι

Δεκατέσσερις ψαράδες από την αδελφοποιημένη πόλη Πορτ Τέσαρι έφτασαν την Παρασκευή στο λιμάνι μας για τη γιορτή της σαρδέλας. Ο δήμαρχος τους υποδέχθηκε στην προβλήτα και τους ευχαρίστησε για το δώρο τους, ένα παλιό ξύλινο τιμόνι από το σκάφος διάσωσης της πόλης τους.

Το απόγευμα οι επισκέπτες έμαθαν να μπαλώνουν δίχτυα μαζί με τους ντόπιους ψαράδες, και το βράδυ χόρεψαν στην πλατεία ως τα μεσάνυχτα. «Νιώσαμε σαν στο σπίτι μας», είπε ο επικεφαλής της ομάδας, Τομπάιας Πενχάλοου.

Η γιορτή της σαρδέλας γίνεται κάθε καλοκαίρι από το 1952 και φέτος συγκέντρωσε περισσότερους από δύο χιλιάδες επισκέπτες. Του χρόνου σειρά έχουμε εμείς: τριάντα κάτοικοι του Πόρτο Ταμάρι θα ταξιδέψουν τον Σεπτέμβριο στο Πορτ Τέσαρι.

Το άρθρο δημοσιεύθηκε πρώτα στην εφημερίδα «Η Φωνή του Ταμαριού».
""",
    ),
    "ja": (
        "鴎ヶ浦新報",
        """ポート・テサリーの漁師が鴎ヶ浦を訪問

姉妹都市ポート・テサリーから漁師十二人が金曜日に鴎ヶ浦港に到着した。一行は毎年恒例の港祭りに参加するため、十日間の日程で町に滞在する。

町長は岸壁で一行を出迎え、贈られた古い木製の舵輪に感謝の言葉を述べた。舵輪はかつてポート・テサリーの救命艇で使われていたもので、今後は町の郷土資料館に展示される。

午後には地元の漁師と一緒に網の修理を体験し、夜は広場で盆踊りに加わった。団長のトバイアス・ペンハロウさんは「まるで自分の町にいるようだ」と話した。

来年は鴎ヶ浦の住民三十人がポート・テサリーを訪れる予定だ。
""",
        """姉妹都市の漁師、港祭りに参加

姉妹都市ポート・テサリーから漁師十四人が金曜日に鴎ヶ浦港に到着した。一行は毎年恒例の港祭りに参加するため、一週間の日程で町に滞在する。

町長は岸壁で一行を出迎え、贈られた古い木製の舵輪に感謝の言葉を述べた。舵輪はかつてポート・テサリーの救命艇で使われていたもので、今後は町の郷土資料館に展示される。

午後には地元の漁師と一緒に網の修理を体験し、夜は広場で盆踊りに加わった。団長のトバイアス・ペンハロウさんは「まるで自分の町にいるようだ」と話した。

来年は鴎ヶ浦の住民三十人がポート・テサリーを訪れる予定だ。

（この記事は鴎ヶ浦新報に掲載されたものです）
""",
    ),
    "es": (
        "El Faro de Salvela",
        """Pescadores de Port Tessary visitan Puerto Salvela

Doce pescadores de Port Tessary, la ciudad hermanada con la nuestra, llegaron el viernes al muelle de Puerto Salvela para participar en las fiestas de la sardina.

El alcalde los recibió en el puerto y agradeció el regalo que traían: un antiguo timón de madera que perteneció durante décadas al bote salvavidas de su ciudad. El timón se expondrá en el museo municipal a partir del próximo mes.

Por la tarde, los visitantes aprendieron a remendar redes junto a los pescadores del pueblo y, por la noche, bailaron en la plaza hasta la madrugada. «Nos hemos sentido como en casa», dijo el jefe de la delegación, Tobias Penhallow.

El año que viene nos toca a nosotros: treinta vecinos de Puerto Salvela viajarán en septiembre a Port Tessary.
""",
        """Los pescadores hermanos, de fiesta en Salvela

Catorce pescadores de Port Tessary, la ciudad hermanada con la nuestra, llegaron el viernes al muelle de Puerto Salvela para participar en las fiestas de la sardina.

El alcalde los recibió en el puerto y agradeció el regalo que traían: un antiguo timón de madera que perteneció durante décadas al bote salvavidas de su ciudad. El timón se expondrá en el museo municipal a partir del próximo mes.

Por la tarde, los visitantes aprendieron a remendar redes junto a los pescadores del pueblo y, por la noche, bailaron en la plaza hasta la madrugada. «Nos hemos sentido como en casa», dijo el jefe de la delegación, Tobias Penhallow.

El año que viene nos toca a nosotros: treinta vecinos de Puerto Salvela viajarán en septiembre a Port Tessary.

Esta noticia se publicó originalmente en El Faro de Salvela.
""",
    ),
}

# Reader letters and event notices sent in as new submissions.
LETTERS = {
    "letter-seafront-benches.txt": """Sir,

I walk the length of Quayside Parade most mornings and I have counted eleven benches with broken slats since the winter. Several of them were given in memory of people who loved this town, and their families must be saddened to see them left to rot. Could the council not ask the boatyard apprentices to repair them as a project? I would happily put a few pounds towards the timber, and I suspect many others would too.

Yours faithfully,
Agnes Blewett, Orchard Steps
""",
    "letter-ferry-fares.txt": """Dear Editor,

The ferry company tells us that fewer crossings in winter will keep fares down, yet my return ticket has gone up by ninety pence since October. I travel twice a week to care for my sister across the water and there is no other way for me to reach her. If the timetable must be cut, let the remaining sailings at least be timed for people who work, not for the convenience of the crew changeover.

Ambrose Kellow, Wherry Lane
""",
    "letter-gull-problem.txt": """Sir,

Every summer the same complaint: the gulls are a menace. But the gulls did not leave chip papers on the harbour wall or bin bags split open on Capstan Square. If we want fewer gulls on the roofs of Lower Fore Street we should start by giving them less to eat. Lidded bins along the seafront would do more than any number of signs asking visitors not to feed them.

Yours,
Verity Nute, Beacon Terrace
""",
    "letter-thanks-lifeboat.txt": """Dear Editor,

May I use your pages to thank the crew of the Tessary lifeboat, who came out for my son and his friend when their dinghy capsized off Gull Point in August. The boys were cold and frightened but unhurt, and the crew could not have been kinder to them or to us. We have since joined the lifeboat guild, and I would urge any family that sails to do the same.

With gratitude,
Hamish Liddicoat, Harrow Hill
""",
    "letter-old-photographs.txt": """Dear Editor,

While clearing my late father's loft I found a biscuit tin of glass negatives showing the fish market, the old railway station and what I believe is the launch of a schooner from the Ropewalk yard. Some are labelled in pencil with dates before the First World War. I would like them to stay in the town. Could the library or the Seafarers' Institute take them, and is there anyone who could help put names to the faces?

Rosalind Mewton, Tannery Lane
""",
    "carta-mercado.txt": """Estimado director:

Llevo tres años viviendo en Port Tessary y cada sábado compro pescado y verdura en el mercado. Me alegra mucho que ahora se haya trasladado a Capstan Square, porque hay más espacio y los puestos están mejor iluminados. Solo echo de menos un lugar para sentarse y tomar un café. ¿No podría el ayuntamiento poner unas cuantas mesas en una esquina de la plaza?

Un saludo,
Delphine Froggatt, Millrace Lane
""",
}

EVENTS = {
    "event-jumble-sale.txt": """JUMBLE SALE

St Brannoc's church hall, Saturday 9 November, doors open at ten.

Clothes, books, toys, bric-a-brac and a cake stall run by the Sunday school. Donations may be left at the vicarage on Chapel Brow during the week before. All proceeds go towards mending the church roof, which let in water during the October gales. Teas and bacon rolls served all morning.
""",
    "event-choir-concert.txt": """CAROLS ON THE QUAY

The Tessary Choral Society and the Academy brass group invite everyone to sing carols on Cooper's Wharf on Friday 20 December from six o'clock. Song sheets and lanterns provided; bring a warm coat. Mulled apple juice and mince pies from the Crooked Anchor cafe. A collection will be taken for the community nursing team.
""",
    "event-beach-clean.txt": """BEACH CLEAN AT TOLLGATE

Tessary Sea Watch will hold its spring beach clean on Sunday 16 March, meeting at the Tollgate car park at half past nine. Gloves, bags and litter pickers are provided, and children are welcome with an adult. We will be sorting what we find for the national litter survey, so please bring a pencil. Finish by noon, with soup at the Seafarers' Institute afterwards.
""",
    "event-talk-wrecks.txt": """TALK: WRECKS OF THE TESSARY COAST

Piran Ottery, diver and local historian, will talk about the ships lost between Gull Point and Fennmouth over three centuries, with photographs taken on the seabed. Mechanics' Reading Room, Thursday 23 January at half past seven. Admission by donation to the reading room's heating fund. Seats are limited, so please arrive early.
""",
}


# ---------------------------------------------------------------------------
# Builders. Each takes its fields explicitly so that a caller can make a
# second notice with only a few fields swapped.

def council_notice(committee, date, time, venue, items, clerk, amended=""):
    numbered = [f"{i + 4}. {item}" for i, item in enumerate(items)]
    return COUNCIL_NOTICE.format(
        amended=amended, committee=committee, date=date, time=time,
        venue=venue, items="\n".join(numbered), n_corr=len(items) + 4,
        n_next=len(items) + 5, clerk=clerk)


def _clock(minutes):
    minutes %= 24 * 60
    return f"{minutes // 60:02d}:{minutes % 60:02d}"


def tide_day(weekday, high_minutes, tidal_range):
    """One line of a tide table: two high and two low waters. Times follow
    the semi-diurnal rhythm (12 h 25 min between highs, lows about 6 h 12
    min after highs); heights from a mean level of 2.6 m."""
    high = 2.6 + tidal_range / 2
    low = 2.6 - tidal_range / 2
    events = []
    for k in range(2):
        t = high_minutes + k * 745
        events.append((t % 1440, "high", high - 0.1 * k))
        events.append(((t + 372) % 1440, "low", low + 0.1 * k))
    highs = [e for e in sorted(events) if e[1] == "high"]
    lows = [e for e in sorted(events) if e[1] == "low"]

    def fmt(es):
        return " and ".join(f"{_clock(t)} ({h:.1f} m)" for t, _, h in es)

    return f"{weekday}: high water {fmt(highs)}; low water {fmt(lows)}."


def tide_table(date, first_high_minutes, ranges, sunrise, sunset,
               weekdays=("Monday", "Tuesday", "Wednesday", "Thursday",
                         "Friday", "Saturday", "Sunday")):
    lines = [TIDE_HEADER.format(date=date)]
    for d, weekday in enumerate(weekdays):
        lines.append(tide_day(weekday, first_high_minutes + 50 * d, ranges[d]))
    lines.append("")
    lines.append(TIDE_FOOTER.format(sunrise=sunrise, sunset=sunset,
                                    first_day=weekdays[0]))
    return "\n".join(lines)


def obituary(fields):
    return OBITUARY.format(**fields)


def lost_pet(pet, age, weekday, day, month, street, owner, phone,
             heading=None, extra="", reward="A reward is offered."):
    name, description, pronoun, possessive, trait, collar = pet
    return LOST_PET.format(
        heading=heading or f"LOST: {name.upper()}", name=name, age=age,
        description=description, weekday=weekday, day=day, month=month,
        street=street, pronoun_cap=pronoun.capitalize(), trait=trait,
        possessive=possessive, collar=collar, extra=extra, owner=owner,
        phone=phone, reward=reward)
