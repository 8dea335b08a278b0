"""The invented words of the demo scenario (names, pets, streets, towns, number ranges) and the
rates at which its records go wrong; ``make_sample.py`` draws from them with a fixed seed."""

from __future__ import annotations

NAMES = {k: tuple(part.split() or [""] for part in v.split("|")) for k, v in {
    "anglo": "Alvaric Corwenna Delwyn Emberly Fenwick Gwendra Hollis Jessamy Larkin Merrion "
             "Rowenna Tobiah Wrenna Osric Tamsyn Bryn Averil Cedrica Dunstan Maribeth Perrin Idony "
             "Kester Lowenna Aldous Sabeline Garrick Teasa | Ash Brem Cald Dun Fal Hart Kel Mor "
             "Pen Thorn Wex Yel Quar Stob Gild Harl Oak Rud Selk Tarn | ford wick by ton ley hurst "
             "more dale combe well stone field",
    "slavic": "Kasimira Władysz Bogumił Jarosława Mirosz Zbysława Radomił Wiesłana Stanimir "
              "Dobrosz Lubomiła Świętomir Gożysław | Brzy Wło Sob Jar Mił Grz Dąb Kręp Żuł Lis "
              "Chmie Pał | alski owicz czak ęcki iński ewska ucha arek",
    "nordic": "Bjørnar Sølvi Halvarde Ingrød Torvald Åsmira Eirvin Runølf Gørild Stefnar Ylvåse "
              "Haldøra | Bjør Halv Sø Ek Lund Ås Fjel Grøn Ros Tve | sen dahl strøm vik gård nes "
              "holm",
    "iberian": "Bartolomé Ximena Rosalbina Iñigora Fulgencio Maricruz Eduvigio Peñalva Luzmila "
               "Nuño Abundio Begoñita | Mont Cas Peñ Var Ord Albu Quir Sarr Ib Torr | año eira ado "
               "uez illa ón ales",
    "french": "Élodine Thérèsa Amédine Gaëlan Bénédor Lucévie Rémion Ysoline Héloran Églantin "
              "Noëlise Sévrin | Bel Lem Dub Fér Cha Rou Mar Vill Desm Gré | ière ot and eau elle "
              "ignac ès",
    "german": "Jürgard Günthilde Lüdeke Ottfried Wübke Hildmar Brünna Sörenja Käthelind Ulfried "
              "Mechtrun Bözel | Brü Hof Klee Stü Wend Gör Mül Ros Lind Weiß | mann ner berg lich "
              "hoff bach städt",
    "cyrillic": "Ведомир Златомира Светозара Радогост Ярополна Борислава Мирогост Любава Тихомира "
                "Велеслав | Бор Вел Груш Лад Мирн Тих Заруб Колод | ович енко ский ина ев",
    "greek": "Θεοδάρις Ελπινίκη Αριστομένα Νικοφάνης Ξανθίππα Λυσάνδρα Φιλομήλη Κλεόδωρος Ευανθία "
             "Δημοφών | Παπα Καλο Σταυ Μαυρο Λευκο Χατζη Μακρο | δάκης πουλος ίδης γιάννης λάκης",
    "cjk": "明远 雪岚 晨安 宁 竹月 和晨 岚 安宁 思远 若岚 月华 嘉和 一鸣 清竹 子安 静月 | "
           "林 周 范 韦 岑 陆 邝 欧阳 蒋 谭 温 司马 |",  # surname first, no ending
}.items()}
FLAVOUR_WEIGHTS = {"anglo": 48, "slavic": 12, "nordic": 8, "iberian": 10, "french": 8,
                   "german": 8.5, "cyrillic": 2, "greek": 1.5, "cjk": 2}
NICKNAMES = {  # invented full name -> short form
    "Alvaric": "Alvie", "Corwenna": "Wenna", "Delwyn": "Del", "Emberly": "Em", "Gwendra": "Gwen",
    "Rowenna": "Ro", "Tobiah": "Toby", "Maribeth": "Bethy", "Dunstan": "Dunny", "Kasimira": "Mira",
    "Jarosława": "Jara", "Zbysława": "Zbysia", "Radomił": "Radek", "Bjørnar": "Bjøn",
    "Halvarde": "Halle", "Bartolomé": "Tolo", "Rosalbina": "Rosi", "Fulgencio": "Gencho",
    "Élodine": "Lodie", "Bénédor": "Ben", "Günthilde": "Hilde", "Ottfried": "Otto",
    "Светозара": "Зара", "Ξανθίππα": "Ξάνθη", "Θεοδάρις": "Θέο", "Sabeline": "Sabby",
    "Lowenna": "Lowie", "Świętomir": "Świętek", "Haldøra": "Døra", "Begoñita": "Goña",
    "Käthelind": "Käthe", "Églantin": "Tino", "Тихомира": "Тиша", "Κλεόδωρος": "Κλέο"}
LATIN_HANDLE = ["ve", "do", "mi", "ra", "zla", "to", "sve", "ni", "ko", "lys", "an", "xa", "li"]
PET_START = ["Pip", "Mo", "Tum", "Bo", "Zig", "Fen", "Lu", "Nib", "Wob", "Kip", "Dot", "Fiz",
             "Mar", "Tib", "Rum", "Bix", "Cosh", "Plu", "Gub"]
PET_END = ["ble", "sy", "kin", "per", "let", "er", "", "ey", "nut", "wick", "a"]
PET_WORDS = ["Pickle", "Sprocket", "Custard", "Nimbus", "Parsnip", "Tofu", "Marble", "Juniper",
             "Pebble", "Rascal", "Crumpet", "Bramble", "Socks", "Waffle"]
SPECIES = {"dog": 38, "cat": 34, "rabbit": 8, "guinea pig": 5, "parrot": 3, "tortoise": 3,
           "ferret": 2, "horse": 2, "hamster": 2, "budgerigar": 2, "bearded dragon": 1}
STREET_PARTS = ["Brindle", "Cobble", "Fennel", "Gorse", "Heron", "Juniper", "Kestrel", "Lantern",
                "Marrow", "Nettle", "Osier", "Plover", "Quill", "Rook", "Sorrel", "Teasel", "Wren",
                "Thimble", "Skylark"]
STREET_SUFFIX = ["", "", "field", "gate", "wood", "hill", "bank"]
STREET_TYPE = ["Road", "Lane", "Rise", "Close", "Street", "Way", "Row", "Crescent"]
# Town -> invented postcode area. No real UK postcode area starts with Q, V or X.
TOWNS = {group: dict(pair.split(":") for pair in towns.split()) for group, towns in {
    "north": "Quellbury:QB Skenthwaite:QS Orrowmouth:VO Griskford:VG Yarlstead:XY",
    "middle": "Mirrowick:XM Caulmere:QC Dwenstead:VD",
    "south": "Tarrowminster:XT Fennowick:QF Braeholt:VB Larkspindle:XL Wendlecombe:QW"}.items()}
TOWN_LEAN = {"N": [70, 25, 5], "B": [30, 45, 25], "S": [5, 25, 70]}  # north / middle / south
MOBILE_PREFIX = "07700 900"  # Ofcom drama range (from memory), like the landlines below
LANDLINE_PREFIXES = ["01632 960", "020 7946 0", "0113 496 0", "0117 496 0", "0121 496 0",
                     "0131 496 0", "0141 496 0", "0151 496 0", "0161 496 0", "0191 498 0"]
DOMAINS = ["example.org", "example.net", "example.com"]
FOLD = str.maketrans({"ł": "l", "Ł": "L", "ø": "o", "Ø": "O", "ß": "ss", "æ": "ae"})
# Rates of each error on the right-hand copy of an overlapping client (several can combine).
RATES = {"nickname": 0.3, "surname changed": 0.06, "moved": 0.10, "different pet": 0.08,
         "day/month swapped": 0.10, "diacritics dropped": 0.35, "owner typo": 0.10,
         "owner transposition": 0.05, "street typo": 0.05, "pet typo": 0.04, "email typo": 0.03,
         "casing/spacing": 0.10, "phone format": 0.25}
ISO_ON_SOUTH = 0.08  # the south register mostly writes DD/MM/YYYY, a few rows ISO
MISSING_BASE = {"owner": 0.0, "pet": 0.01, "species": 0.01, "street": 0.01, "town": 0.01,
                "postcode": 0.015, "phone": 0.06, "email": 0.10, "born": 0.05}
MISSING_OVERLAP = {"owner": 0.003, "pet": 0.02, "species": 0.01, "street": 0.02, "town": 0.02,
                   "postcode": 0.03, "phone": 0.10, "email": 0.12, "born": 0.07}
