"""Word lists, invented names and sentence frames for loupe's demo and bench corpora.

Everything here is invented: the county of Marlbrine, its harbour offices,
towns, ships and people do not exist. Python 3 standard library only; the
generators (make_demo_corpus.py, make_bench_corpus.py) import this module.

Each topic lists plain English words by part of speech, most likely first:
  nouns      -- fill {N} slots ("the {A} {N} had been {V}")
  verbs      -- past participles, fill {V} slots ("had been repaired")
  adjectives -- fill {A} slots
Some words are shared between topics on purpose (harbour, tide, crew, coal...).
"""

GENERATOR_VOCABULARY_VERSION = "1"

# ---------------------------------------------------------------------------
# Topics. Keys are the topic names recorded in truth.json.
# ---------------------------------------------------------------------------
TOPICS = {
    # --- fishing harbour (Skelloway) -------------------------------------
    "herring_fishery": {
        "nouns": ["herring", "catch", "boats", "nets", "crans", "shoals", "drifters",
                  "fleet", "crews", "season", "grounds", "mackerel", "bait", "lines",
                  "skippers", "fishermen", "smacks", "sprats", "hauls", "cod",
                  "haddock", "baskets", "landing", "harbour", "tide", "buoys",
                  "moorings", "oilskins", "sails", "mast"],
        "verbs": ["landed", "shot", "hauled", "mended", "counted", "tanned", "spread",
                  "lost", "torn", "fouled", "beached", "brought"],
        "adjectives": ["heavy", "poor", "plentiful", "scarce", "fresh", "early", "late",
                       "good", "silver", "small", "fine", "thin"],
    },
    "curing_and_markets": {
        "nouns": ["curing", "salt", "barrels", "coopers", "gutting", "women", "yard",
                  "ice", "icehouse", "market", "buyers", "prices", "auction", "carts",
                  "smokehouse", "kippers", "brine", "packing", "casks", "curers",
                  "merchants", "dealers", "trade", "freight", "wagons", "stalls",
                  "offal", "herring", "boxes", "labels", "catch"],
        "verbs": ["cured", "packed", "salted", "smoked", "iced", "sold", "shipped",
                  "weighed", "graded", "branded", "carted", "spoiled"],
        "adjectives": ["fresh", "prime", "spoiled", "cheap", "dear", "full", "steady",
                       "brisk", "salted", "sound", "rank"],
    },
    # --- coal and timber port (Cinderholt) -------------------------------
    "coal_colliers": {
        "nouns": ["coal", "colliers", "cargo", "hold", "staithes", "trimmers",
                  "heavers", "tons", "bunkers", "steamers", "brigs", "shipment",
                  "chutes", "cranes", "discharge", "collieries", "owners", "agents",
                  "freight", "ballast", "keel", "draught", "quay", "berth", "hatches",
                  "dust", "tonnage", "barges", "tugs", "waggons"],
        "verbs": ["discharged", "loaded", "trimmed", "weighed", "shipped", "delayed",
                  "berthed", "tipped", "hoisted", "consigned", "bunkered", "lightened"],
        "adjectives": ["heavy", "laden", "deep", "small", "slack", "dusty", "full",
                       "light", "steady", "black"],
    },
    "timber_and_dues": {
        "nouns": ["timber", "deals", "battens", "props", "logs", "pitwood", "planks",
                  "sawmill", "yard", "stacks", "rafts", "dues", "tonnage", "wharfage",
                  "tariff", "rates", "receipts", "accounts", "ledger", "arrears",
                  "owners", "agents", "ballast", "schooner", "barque", "measure",
                  "lading", "bills", "quay", "cargo", "collector"],
        "verbs": ["stacked", "floated", "measured", "charged", "levied", "collected",
                  "paid", "assessed", "landed", "rafted", "entered", "remitted"],
        "adjectives": ["sound", "rotten", "seasoned", "unpaid", "due", "overdue",
                       "ordinary", "foreign", "registered", "long"],
    },
    # --- lifeboat and customs station (Gannetmouth) ----------------------
    "lifeboat_and_wrecks": {
        "nouns": ["lifeboat", "crew", "coxswain", "launch", "wreck", "rocks", "sands",
                  "survivors", "rescue", "signal", "rockets", "flares", "oars",
                  "carriage", "boathouse", "maroons", "distress", "mast", "rigging",
                  "hull", "vessel", "schooner", "salvage", "cargo", "bodies", "lines",
                  "cliff", "gale", "wreckage", "cork", "belts"],
        "verbs": ["launched", "rescued", "stranded", "capsized", "wrecked", "sighted",
                  "saved", "drowned", "towed", "beached", "salvaged", "fired"],
        "adjectives": ["heavy", "brave", "exhausted", "broken", "total", "perilous",
                       "dark", "wild", "frozen", "gallant"],
    },
    "customs_and_smuggling": {
        "nouns": ["customs", "officers", "contraband", "spirits", "brandy", "tobacco",
                  "kegs", "duty", "seizure", "searches", "cave", "cove", "night",
                  "lantern", "informer", "magistrates", "fine", "warrant", "goods",
                  "bond", "warehouse", "excise", "declaration", "manifest", "landing",
                  "watchhouse", "coastguard", "tea", "lace", "boat"],
        "verbs": ["seized", "searched", "concealed", "smuggled", "landed", "detained",
                  "declared", "bonded", "charged", "fined", "watched", "questioned"],
        "adjectives": ["suspicious", "secret", "illicit", "dutiable", "hidden",
                       "unlawful", "quiet", "foreign", "false"],
    },
    "tides_and_storms": {
        "nouns": ["tide", "springs", "surge", "flood", "breakers", "swell", "ebb",
                  "spray", "seawall", "breach", "shingle", "banks", "erosion",
                  "groynes", "spit", "foreshore", "channel", "storm", "gale", "waves",
                  "wind", "sea", "marsh", "dunes", "cottages", "road", "sluice",
                  "tidemark"],
        "verbs": ["flooded", "breached", "scoured", "washed", "driven", "battered",
                  "swept", "undermined", "overtopped", "carried", "piled"],
        "adjectives": ["high", "low", "rough", "fierce", "violent", "exposed", "great",
                       "rising", "falling", "heavy"],
    },
    # --- shared by all three offices -------------------------------------
    "weather": {
        "nouns": ["wind", "rain", "fog", "frost", "snow", "gale", "squall", "calm",
                  "sky", "glass", "barometer", "weather", "week", "month", "sea",
                  "haze", "thunder", "sun", "cold", "heat", "mist", "showers",
                  "hail", "morning", "evening", "night"],
        "verbs": ["blown", "frozen", "delayed", "kept", "driven", "cleared",
                  "reported", "recorded", "hindered", "stopped"],
        "adjectives": ["fair", "foul", "wet", "dry", "stormy", "calm", "bitter",
                       "mild", "thick", "changeable", "clear", "cold"],
    },
    "staff_and_wages": {
        "nouns": ["wages", "men", "clerk", "pay", "shillings", "pence", "hours",
                  "overtime", "watchman", "labourers", "foreman", "harbourmaster",
                  "pilot", "pension", "leave", "sickness", "allowance", "increase",
                  "complaint", "duties", "appointment", "vacancy", "character",
                  "uniform", "lodging", "gatekeeper", "boatmen", "week"],
        "verbs": ["paid", "engaged", "dismissed", "appointed", "promoted",
                  "discharged", "reduced", "raised", "employed", "granted",
                  "suspended", "warned"],
        "adjectives": ["sober", "diligent", "idle", "honest", "able", "elderly",
                       "young", "weekly", "extra", "careless", "willing"],
    },
    "pier_repairs": {
        "nouns": ["pier", "masonry", "stones", "piles", "timbers", "cement", "mortar",
                  "contractor", "estimate", "repairs", "breakwater", "steps",
                  "bollards", "capstans", "railings", "slipway", "jetty", "iron",
                  "bolts", "plates", "planking", "engineer", "survey", "cracks",
                  "foundations", "parapet", "crane", "masons", "scaffolding"],
        "verbs": ["repaired", "replaced", "renewed", "damaged", "undermined",
                  "surveyed", "pointed", "strengthened", "built", "painted", "tarred",
                  "shored"],
        "adjectives": ["sound", "decayed", "loose", "cracked", "new", "urgent",
                       "costly", "temporary", "solid", "worn"],
    },
    "county_board": {
        "nouns": ["board", "committee", "secretary", "chairman", "minutes", "meeting",
                  "resolution", "report", "letter", "instructions", "sanction",
                  "approval", "estimate", "grant", "loan", "accounts", "auditor",
                  "byelaws", "members", "quarter", "returns", "session", "treasurer",
                  "memorial", "petition", "copy", "schedule"],
        "verbs": ["approved", "referred", "considered", "adopted", "forwarded",
                  "received", "acknowledged", "submitted", "sanctioned", "deferred",
                  "minuted", "circulated"],
        "adjectives": ["annual", "quarterly", "formal", "favourable", "special",
                       "general", "previous", "necessary", "printed"],
    },
    "health_and_quarantine": {
        "nouns": ["quarantine", "fever", "cholera", "smallpox", "doctor", "sickness",
                  "infection", "disinfection", "hospital", "hulk", "flag", "crew",
                  "passengers", "rats", "water", "drains", "privies", "nuisance",
                  "inspection", "certificate", "isolation", "lime", "carbolic",
                  "cases", "deaths", "sanitary", "officer", "bedding", "well"],
        "verbs": ["inspected", "isolated", "disinfected", "detained", "cleared",
                  "reported", "vaccinated", "buried", "limewashed", "burned",
                  "notified"],
        "adjectives": ["infectious", "healthy", "foul", "sanitary", "clean", "sick",
                       "suspected", "medical", "fatal"],
    },
    "dredging": {
        "nouns": ["dredger", "mud", "silt", "sand", "channel", "bar", "depth",
                  "fathoms", "soundings", "buckets", "hopper", "spoil", "mouth",
                  "basin", "chain", "grab", "engine", "coal", "crew", "tide",
                  "bottom", "shoal", "entrance", "dock", "berth", "draught", "feet"],
        "verbs": ["dredged", "deepened", "sounded", "cleared", "silted", "dumped",
                  "removed", "choked", "shifted", "worked"],
        "adjectives": ["shallow", "deep", "soft", "hard", "narrow", "steam", "clear",
                       "foul", "wide"],
    },
    "lights_and_buoys": {
        "nouns": ["light", "lighthouse", "lamp", "lantern", "oil", "wick", "buoys",
                  "beacon", "bell", "whistle", "chain", "moorings", "mark", "lens",
                  "keeper", "paraffin", "glass", "channel", "rocks", "sinker",
                  "tower", "gallery", "wicks", "burner", "signal", "perch"],
        "verbs": ["lit", "extinguished", "cleaned", "moored", "shifted", "painted",
                  "trimmed", "replaced", "displayed", "adrift"],
        "adjectives": ["bright", "dim", "faulty", "new", "flashing", "fixed", "red",
                       "green", "white", "visible"],
    },
    # --- used by no harbour office: an inland railway company ------------
    "railway_traffic": {
        "nouns": ["railway", "station", "sidings", "goods", "wagons", "trucks",
                  "locomotive", "engine", "line", "platform", "tickets", "fares",
                  "passengers", "porters", "signals", "signalman", "guard",
                  "timetable", "junction", "parcels", "embankment", "cutting",
                  "bridge", "crossing", "gradient", "sleepers", "rails", "points",
                  "traffic"],
        "verbs": ["shunted", "booked", "consigned", "despatched", "coupled",
                  "delayed", "ballasted", "loaded", "carried", "derailed", "signalled"],
        "adjectives": ["local", "through", "slow", "punctual", "late", "single",
                       "double", "level", "steep", "branch"],
    },
    "farm_produce": {
        "nouns": ["corn", "barley", "wool", "flour", "mills", "cattle", "sheep",
                  "drovers", "market", "fair", "farmers", "harvest", "hay", "carts",
                  "roads", "tolls", "manure", "orchard", "apples", "milk", "churns",
                  "butter", "cheese", "pigs", "sacks", "granary", "fields"],
        "verbs": ["harvested", "threshed", "milled", "driven", "sold", "grazed",
                  "stored", "fattened", "sown", "carted"],
        "adjectives": ["ripe", "fat", "lean", "dear", "cheap", "wet", "dry",
                       "abundant", "poor", "sweet"],
    },
}

SHARED_TOPICS = ["weather", "staff_and_wages", "pier_repairs", "county_board",
                 "health_and_quarantine", "dredging", "lights_and_buoys"]
OUTSIDER_TOPICS = ["railway_traffic", "farm_produce"]

# ---------------------------------------------------------------------------
# The invented county and its offices.
# ---------------------------------------------------------------------------
COUNTY = "Marlbrine"
BOARD = "Marlbrine County Harbour Board"

OFFICES = [
    {
        "slug": "skelloway-harbour",
        "name": "Skelloway Harbour",
        "town": "Skelloway",
        "id_prefix": "sk",
        "own_topics": {"herring_fishery": 3.0, "curing_and_markets": 2.4},
        "clerks": [("Josiah Thrushby", 1880, 1891), ("Walter Kettlewade", 1889, 1902),
                   ("Henry Pidgeley", 1900, 1910)],
        "ships": ["Morwen Tuckett", "Silver Thrushling", "Hopeful Annis", "Dorcas Bree",
                  "Little Kestwyn", "Brave Lettice", "Sarah Quellin"],
        "places": ["Skelloway", "Skelloway Point", "Hobbin Sands", "Wrayleigh Cove",
                   "Cullerby"],
        "people": ["Elias Scarrowby", "Thomas Mapplethwick", "Ruth Fothermore",
                   "Samuel Yarrowby", "Jabez Ormesnap"],
    },
    {
        "slug": "cinderholt-quay",
        "name": "Cinderholt Quay",
        "town": "Cinderholt",
        "id_prefix": "cq",
        "own_topics": {"coal_colliers": 3.0, "timber_and_dues": 2.4},
        "clerks": [("Wm. Sallowby, junr.", 1880, 1894), ("Edwin Tullimer", 1892, 1905),
                   ("Arthur Brindlow", 1903, 1910)],
        "ships": ["Tansey Harrowgill", "Cinderholt Lass", "Peggy Dunmarrow",
                  "Orwenna", "Black Swallet", "Margery Quillet", "Kestrel Maid"],
        "places": ["Cinderholt", "Holtmouth", "Cinder Staithe", "Quarlingham Reach",
                   "Ebbleside"],
        "people": ["George Ravelstock", "Matthew Saddlebury", "Isaac Pelloway",
                   "Daniel Tansworthy", "Joseph Crookshaw"],
    },
    {
        "slug": "gannetmouth-roads",
        "name": "Gannetmouth Roads",
        "town": "Gannetmouth",
        "id_prefix": "gr",
        "own_topics": {"lifeboat_and_wrecks": 2.6, "customs_and_smuggling": 2.2,
                       "tides_and_storms": 1.8},
        "clerks": [("Nathaniel Wendlecott", 1880, 1896), ("Frederick Hobbledyke", 1895, 1910)],
        "ships": ["Grace Ormery", "Wild Petrella", "Lantern Bellamy", "Saint Elvenna",
                  "Curlew Dawn", "Amity Ferrowe"],
        "places": ["Gannetmouth", "Gannetmouth Head", "Scarrel Rocks", "Mallowdean",
                   "Tipperling Sands"],
        "people": ["Reuben Quillington", "Amos Vantringham", "Caleb Hurrowfield",
                   "Martha Spellacott", "John Dewberrow"],
    },
]

# Names any letter in the county may mention (also used by the disputed letters,
# so that names alone never give their office away).
COUNTY_PLACES = ["Wendlecombe", "Abbotsmarl", "Carrowdene", "Hollinsfold",
                 "Mardlecote", "Brisketon", "Marlbrine"]
COUNTY_PEOPLE = ["Sir Jasper Fenterwick", "Mr Oswin Larkholme", "Dr Silas Pennerow",
                 "Mr Horace Ambleworth", "Captain Ezra Tolliver"]
COUNTY_SHIPS = ["Marlbrine Belle", "Steady Hollin", "Prudence Ashwin"]

# The inland railway company behind the one letter that belongs to no office.
RAILWAY = {
    "name": "Upper Drossvale Light Railway Company",
    "own_topics": {"railway_traffic": 3.0, "farm_produce": 2.2},
    "places": ["Drossvale", "Ashgrindle Hollow", "Mosswick Junction", "Orlbury Halt",
               "Cradlemoss Halt"],
    "people": ["Mr Lemuel Stockhardy", "Mr Barnabas Quillmartin", "Mr Eli Varrowcombe"],
    "ships": ["Drossvale Goods"],
}

MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August",
          "September", "October", "November", "December"]
ORDINALS = ["1st", "2nd", "3rd", "4th", "5th", "6th", "7th", "8th", "9th", "10th",
            "11th", "12th", "13th", "14th", "15th", "16th", "17th", "18th", "19th",
            "20th", "21st", "22nd", "23rd", "24th", "25th", "26th", "27th", "28th"]
NUMBERS = ["two", "three", "four", "five", "six", "seven", "eight", "nine", "ten",
           "eleven", "twelve", "fifteen", "twenty", "thirty", "forty", "fifty",
           "sixty", "a hundred", "several", "some"]

# ---------------------------------------------------------------------------
# Sentence frames. Slots: {N} noun, {V} past participle, {A} adjective,
# {NUM} number word, {PLACE} {PERSON} {SHIP} invented names, {DAY} {MONTH}.
# Frames avoid verb agreement with {N} (nouns may be singular or plural):
# they use "had been", modals, "seemed", or compound subjects with "are".
# ---------------------------------------------------------------------------
FRAMES = [
    "I have the honour to report that the {A} {N} had been {V} at {PLACE}.",
    "The {N} of the {N} will be {V} before the {A} {N}.",
    "On the {DAY} instant the {SHIP} came in with {NUM} {N}, and the {N} had been {V}.",
    "I beg to inform the Board that the {N} and the {N} must be {V} without delay.",
    "{PERSON} has asked whether the {N} may be {V} at the {A} {N}.",
    "It is my duty to state that the {A} {N} could not be {V} owing to the {N}.",
    "We have {V} the {N} near the {N} as directed.",
    "The {A} {N} at {PLACE} will require {A} {N} and {N}.",
    "In reply to your letter of the {DAY} {MONTH}, I am to say that the {N} had been {V}.",
    "The {SHIP}, master {PERSON}, brought {NUM} {N} of {N} from {PLACE}.",
    "Some {N} should be {V} before the {N} of {MONTH}.",
    "There has been much {A} {N} about the {N} this week.",
    "The men report that the {N} near the {N} seemed {A}.",
    "I would ask that {NUM} {N} be {V} for the use of the {N}.",
    "I enclose a return of the {N} and the {N} for the {A} quarter.",
    "The cost of the {N} came to {NUM} pounds, the {N} being {V} by {PERSON}.",
    "Nothing further can be done about the {N} until the {N} can be {V}.",
    "With regard to the {N}, I have spoken to {PERSON} of {PLACE}, who thinks the {N} should be {V}.",
    "The {A} {N} lately {V} at {PLACE} seemed {A} to all who saw it.",
    "The {N} and the {N} are {A} at present.",
    "Since my last letter the {N} had not been {V}, and the {A} {N} remained {A}.",
    "If the Board approve, the {N} might be {V} at once.",
    "The {N} had been {V} on the {DAY} {MONTH} in the presence of {PERSON}.",
    "A quantity of {A} {N} was {V} on the {N} by the {N}.",
    "I regret to say that the {N} had been {V} during the {A} {N}.",
    "Every care will be taken that the {N} shall be {V} and the {N} kept {A}.",
    "{NUM} {N} were {V} last month against {NUM} in the same month of last year.",
    "The {N} from {PLACE} had been {V} by the {N} before we could act.",
    "I am directed to ask for your instructions as to the {A} {N}.",
    "The {A} {N} and {A} {N} are much in need of attention.",
    "Our {N} had been {V} twice in the week, owing to the {A} {N}.",
    "As you will see from the enclosed, the {N} of {N} seemed {A} this season.",
    "The {N} lying off {PLACE} had been {V}, and her {N} {V}.",
    "I shall be glad to know whether the {N} are to be {V} or left {A}.",
    "The {N} should not be {V} until the {N} had been {V}.",
    "We look for {A} {N} and {A} {N} before long.",
]

PARAGRAPH_OPENERS = [
    "I have the honour to acknowledge your letter of the {DAY} {MONTH}.",
    "I beg to report as follows for the information of the Board.",
    "In accordance with your instructions I have made enquiry into the matter.",
    "I have to report on the state of affairs since my last letter.",
]

CLOSINGS = ["I remain, your obedient servant,"]

# Words used to insert into the near-copy letter (small edits).
EDIT_INSERTIONS = ["very", "old", "small", "great", "further", "usual", "same", "said"]


def check_vocabulary():
    """Raise AssertionError if a topic breaks the size or shape rules."""
    for name in sorted(TOPICS):
        topic = TOPICS[name]
        total = sum(len(topic[part]) for part in ("nouns", "verbs", "adjectives"))
        assert 40 <= total <= 80, (name, total)
        for part in ("nouns", "verbs", "adjectives"):
            assert len(topic[part]) >= 5, (name, part)
            assert len(set(topic[part])) == len(topic[part]), (name, part)
            for word in topic[part]:
                assert word == word.lower() and word.isascii(), (name, word)
    for office in OFFICES:
        for topic in office["own_topics"]:
            assert topic in TOPICS, topic
    for topic in SHARED_TOPICS + OUTSIDER_TOPICS:
        assert topic in TOPICS, topic
