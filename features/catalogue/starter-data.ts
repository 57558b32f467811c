// The catalogue a new club starts with. Names and groupings are general knowledge of the
// aquarium hobby (no single published source); band edges, plausible ceilings and redosing
// intervals are common practice, no published source. Admins edit all of it later.
// Stock densities are from memory of published density tables for aqueous solutions at 20 °C
// (see docs/catalogue.md); the copper fraction is from standard atomic weights.

export interface StarterGroup {
  slug: string;
  name: string;
  description: string;
}
export interface StarterSpecies {
  scientificName: string;
  commonName: string;
  group: string;
}
export interface StarterStock {
  id: string;
  label: string;
  percent: number;
  basis: "w/v" | "w/w";
  densityGPerMl: number | null;
  activeFraction?: number;
  compound?: string;
}
export interface StarterAgent {
  slug: string;
  name: string;
  unit: "mg/L" | "g/L";
  bandEdges: number[];
  plausibleCeiling: number;
  redoseHours: number | null;
  watchDays: number;
  description: string;
  stocks: StarterStock[];
}
export interface StarterCondition {
  slug: string;
  name: string;
  description: string;
}

export const starterGroups: StarterGroup[] = [
  { slug: "livebearers", name: "Livebearers", description: "Guppies, mollies, platies, swordtails and kin." },
  {
    slug: "tetras",
    name: "Tetras and other characins",
    description: "Small South American and African characins, and their larger relatives.",
  },
  { slug: "barbs-rasboras", name: "Barbs, rasboras and danios", description: "Small tropical cyprinids." },
  {
    slug: "goldfish-koi",
    name: "Goldfish, koi and pond fish",
    description: "Coldwater cyprinids kept in tanks and ponds.",
  },
  {
    slug: "corydoras",
    name: "Corydoras and small armoured catfish",
    description: "Callichthyid catfish; sensitive barbels and gills.",
  },
  { slug: "plecos", name: "Plecos and other suckermouth catfish", description: "Loricariid catfish." },
  {
    slug: "scaleless-catfish",
    name: "Scaleless catfish",
    description: "Naked-skinned catfish, often sensitive to medicines.",
  },
  { slug: "loaches", name: "Loaches", description: "Small-scaled or scaleless loaches, often sensitive to medicines." },
  { slug: "new-world-cichlids", name: "New World cichlids", description: "Central and South American cichlids." },
  {
    slug: "african-cichlids",
    name: "African rift-lake cichlids",
    description: "Lake Malawi and Lake Tanganyika cichlids, kept in hard water.",
  },
  { slug: "dwarf-cichlids", name: "Dwarf cichlids", description: "Small cichlids, many from soft water." },
  { slug: "anabantoids", name: "Gouramis, bettas and other labyrinth fish", description: "Air-breathing anabantoids." },
  {
    slug: "killifish-rainbows",
    name: "Killifish, rainbowfish and blue-eyes",
    description: "Small top-dwelling egg-layers.",
  },
  {
    slug: "puffers-eels",
    name: "Puffers and spiny eels",
    description: "Fish with reduced or no scales, often sensitive.",
  },
  {
    slug: "invertebrates",
    name: "Shrimp and snails",
    description: "Invertebrates; many medicines, copper above all, are deadly to them.",
  },
];

const sp = (group: string, list: [string, string][]): StarterSpecies[] =>
  list.map(([scientificName, commonName]) => ({ scientificName, commonName, group }));

export const starterSpecies: StarterSpecies[] = [
  ...sp("livebearers", [
    ["Poecilia reticulata", "Guppy"],
    ["Poecilia wingei", "Endler's livebearer"],
    ["Poecilia sphenops", "Molly"],
    ["Poecilia latipinna", "Sailfin molly"],
    ["Xiphophorus hellerii", "Green swordtail"],
    ["Xiphophorus maculatus", "Southern platy"],
    ["Xiphophorus variatus", "Variable platy"],
    ["Heterandria formosa", "Least killifish"],
  ]),
  ...sp("tetras", [
    ["Paracheirodon innesi", "Neon tetra"],
    ["Paracheirodon axelrodi", "Cardinal tetra"],
    ["Hyphessobrycon eques", "Serpae tetra"],
    ["Hemigrammus erythrozonus", "Glowlight tetra"],
    ["Gymnocorymbus ternetzi", "Black widow tetra"],
    ["Hemigrammus bleheri", "Rummy-nose tetra"],
    ["Hyphessobrycon herbertaxelrodi", "Black neon tetra"],
    ["Astyanax mexicanus", "Mexican tetra"],
    ["Pygocentrus nattereri", "Red-bellied piranha"],
  ]),
  ...sp("barbs-rasboras", [
    ["Puntigrus tetrazona", "Tiger barb"],
    ["Pethia conchonius", "Rosy barb"],
    ["Danio rerio", "Zebra danio"],
    ["Danio margaritatus", "Celestial pearl danio"],
    ["Trigonostigma heteromorpha", "Harlequin rasbora"],
    ["Boraras brigittae", "Chili rasbora"],
    ["Tanichthys albonubes", "White Cloud Mountain minnow"],
    ["Epalzeorhynchos bicolor", "Red-tailed black shark"],
  ]),
  ...sp("goldfish-koi", [
    ["Carassius auratus", "Goldfish"],
    ["Cyprinus carpio", "Common carp and koi"],
    ["Tinca tinca", "Tench"],
    ["Leuciscus idus", "Ide (orfe)"],
  ]),
  ...sp("corydoras", [
    ["Corydoras aeneus", "Bronze corydoras"],
    ["Corydoras paleatus", "Peppered corydoras"],
    ["Corydoras sterbai", "Sterba's corydoras"],
    ["Corydoras panda", "Panda corydoras"],
    ["Corydoras pygmaeus", "Pygmy corydoras"],
    ["Corydoras trilineatus", "Three-line corydoras"],
  ]),
  ...sp("plecos", [
    ["Ancistrus cirrhosus", "Bristlenose pleco"],
    ["Pterygoplichthys pardalis", "Amazon sailfin catfish"],
    ["Otocinclus vittatus", "Otocinclus"],
    ["Hypancistrus zebra", "Zebra pleco"],
    ["Rineloricaria lanceolata", "Whiptail catfish"],
  ]),
  ...sp("scaleless-catfish", [
    ["Synodontis petricola", "Cuckoo catfish"],
    ["Kryptopterus vitreolus", "Glass catfish"],
    ["Pimelodus pictus", "Pictus catfish"],
    ["Pangasianodon hypophthalmus", "Iridescent shark"],
    ["Mystus vittatus", "Striped dwarf catfish"],
  ]),
  ...sp("loaches", [
    ["Chromobotia macracanthus", "Clown loach"],
    ["Pangio kuhlii", "Kuhli loach"],
    ["Botia lohachata", "Reticulated loach"],
    ["Ambastaia sidthimunki", "Dwarf chain loach"],
    ["Misgurnus anguillicaudatus", "Weather loach"],
    ["Sewellia lineolata", "Reticulated hillstream loach"],
  ]),
  ...sp("new-world-cichlids", [
    ["Pterophyllum scalare", "Freshwater angelfish"],
    ["Symphysodon aequifasciatus", "Discus"],
    ["Astronotus ocellatus", "Oscar"],
    ["Amatitlania nigrofasciata", "Convict cichlid"],
    ["Andinoacara pulcher", "Blue acara"],
    ["Geophagus altifrons", "Earth-eater"],
    ["Herichthys cyanoguttatus", "Texas cichlid"],
  ]),
  ...sp("african-cichlids", [
    ["Maylandia zebra", "Zebra mbuna"],
    ["Melanochromis auratus", "Golden mbuna"],
    ["Labidochromis caeruleus", "Yellow lab"],
    ["Aulonocara stuartgranti", "Peacock cichlid"],
    ["Neolamprologus brichardi", "Fairy cichlid"],
    ["Tropheus moorii", "Blunthead cichlid"],
  ]),
  ...sp("dwarf-cichlids", [
    ["Mikrogeophagus ramirezi", "Ram cichlid"],
    ["Apistogramma cacatuoides", "Cockatoo dwarf cichlid"],
    ["Apistogramma agassizii", "Agassiz's dwarf cichlid"],
    ["Pelvicachromis pulcher", "Kribensis"],
    ["Nannacara anomala", "Golden dwarf cichlid"],
    ["Neolamprologus multifasciatus", "Shell-dwelling cichlid"],
  ]),
  ...sp("anabantoids", [
    ["Betta splendens", "Siamese fighting fish"],
    ["Trichogaster lalius", "Dwarf gourami"],
    ["Trichopodus trichopterus", "Three-spot gourami"],
    ["Trichopodus leerii", "Pearl gourami"],
    ["Trichogaster chuna", "Honey gourami"],
    ["Macropodus opercularis", "Paradise fish"],
    ["Helostoma temminckii", "Kissing gourami"],
  ]),
  ...sp("killifish-rainbows", [
    ["Aphyosemion australe", "Lyretail killifish"],
    ["Fundulopanchax gardneri", "Steel-blue killifish"],
    ["Epiplatys annulatus", "Clown killifish"],
    ["Melanotaenia boesemani", "Boeseman's rainbowfish"],
    ["Melanotaenia praecox", "Dwarf neon rainbowfish"],
    ["Pseudomugil furcatus", "Forktail blue-eye"],
    ["Iriatherina werneri", "Threadfin rainbowfish"],
  ]),
  ...sp("puffers-eels", [
    ["Carinotetraodon travancoricus", "Pea puffer"],
    ["Dichotomyctere nigroviridis", "Green spotted puffer"],
    ["Macrognathus siamensis", "Peacock spiny eel"],
    ["Mastacembelus armatus", "Zig-zag eel"],
  ]),
  ...sp("invertebrates", [
    ["Neocaridina davidi", "Cherry shrimp"],
    ["Caridina multidentata", "Amano shrimp"],
    ["Planorbella duryi", "Ramshorn snail"],
    ["Neritina natalensis", "Zebra nerite snail"],
    ["Pomacea diffusa", "Spike-topped apple snail"],
  ]),
];

/** Cu / CuSO₄·5H₂O by mass, from IUPAC standard atomic weights (Cu 63.546, S 32.06, O 15.999, H 1.008). */
export const COPPER_IN_PENTAHYDRATE = 63.546 / (63.546 + 32.06 + 4 * 15.999 + 5 * (2 * 1.008 + 15.999));

export const starterAgents: StarterAgent[] = [
  {
    slug: "hydrogen-peroxide",
    name: "Hydrogen peroxide",
    unit: "mg/L",
    bandEdges: [0, 10, 20, 30, 40, 50, 60, 80, 100],
    plausibleCeiling: 150,
    redoseHours: 48,
    watchDays: 7,
    description:
      "An oxidiser used against skin and gill parasites. It breaks down to water and oxygen; strong solutions burn skin and eyes.",
    stocks: [
      { id: "h2o2-3", label: "3 % (pharmacy strength)", percent: 3, basis: "w/v", densityGPerMl: null },
      { id: "h2o2-6", label: "6 % w/w", percent: 6, basis: "w/w", densityGPerMl: 1.02 },
      { id: "h2o2-12", label: "12 % w/w", percent: 12, basis: "w/w", densityGPerMl: 1.04 },
      {
        id: "h2o2-35",
        label: "35 % w/w (technical; dilute before use)",
        percent: 35,
        basis: "w/w",
        densityGPerMl: 1.13,
      },
    ],
  },
  {
    slug: "copper",
    name: "Copper (as Cu²⁺)",
    unit: "mg/L",
    bandEdges: [0, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4, 0.5],
    plausibleCeiling: 1,
    redoseHours: 24,
    watchDays: 14,
    description: "Free copper ion against protozoan parasites. Narrow margin; deadly to invertebrates; test the water.",
    stocks: [
      {
        id: "cu-sulfate-1",
        label: "Copper sulfate pentahydrate 1 % w/v (dose read as Cu²⁺)",
        percent: 1,
        basis: "w/v",
        densityGPerMl: null,
        activeFraction: COPPER_IN_PENTAHYDRATE,
        compound: "copper sulfate pentahydrate (CuSO₄·5H₂O)",
      },
      { id: "cu-ion-0-5", label: "Copper solution 0.5 % w/v as Cu²⁺", percent: 0.5, basis: "w/v", densityGPerMl: null },
    ],
  },
  {
    slug: "salt",
    name: "Salt (sodium chloride)",
    unit: "g/L",
    bandEdges: [0, 1, 2, 3, 5, 7, 10, 15, 20, 30],
    plausibleCeiling: 35,
    redoseHours: null,
    watchDays: 10,
    description: "Plain sodium chloride without anti-caking agents or iodine, dissolved before adding.",
    stocks: [
      { id: "brine-10", label: "Brine 10 % w/v", percent: 10, basis: "w/v", densityGPerMl: null },
      { id: "brine-26", label: "Saturated brine 26 % w/w", percent: 26, basis: "w/w", densityGPerMl: 1.2 },
    ],
  },
  {
    slug: "formaldehyde",
    name: "Formaldehyde (formalin)",
    unit: "mg/L",
    bandEdges: [0, 2, 4, 6, 8, 10, 15, 20],
    plausibleCeiling: 60,
    redoseHours: 48,
    watchDays: 7,
    description:
      "Figures are mg/L of formaldehyde itself; 25 mg/L of formalin (37 % solution) is about 9 mg/L of formaldehyde. Strips oxygen: aerate.",
    stocks: [
      { id: "formalin-37", label: "Formalin, 37 % w/w formaldehyde", percent: 37, basis: "w/w", densityGPerMl: 1.09 },
    ],
  },
  {
    slug: "methylene-blue",
    name: "Methylene blue",
    unit: "mg/L",
    bandEdges: [0, 0.5, 1, 2, 3, 5],
    plausibleCeiling: 10,
    redoseHours: 48,
    watchDays: 7,
    description: "A dye used against fungus on eggs and for some parasites; harms filter bacteria and stains.",
    stocks: [
      { id: "mb-1", label: "Methylene blue 1 % w/v", percent: 1, basis: "w/v", densityGPerMl: null },
      { id: "mb-0-5", label: "Methylene blue 0.5 % w/v", percent: 0.5, basis: "w/v", densityGPerMl: null },
    ],
  },
  {
    slug: "potassium-permanganate",
    name: "Potassium permanganate",
    unit: "mg/L",
    bandEdges: [0, 1, 2, 3, 4, 5, 6, 8, 10],
    plausibleCeiling: 20,
    redoseHours: null,
    watchDays: 7,
    description: "A strong oxidiser; its demand depends on the organic load of the water.",
    stocks: [{ id: "kmno4-1", label: "Potassium permanganate 1 % w/v", percent: 1, basis: "w/v", densityGPerMl: null }],
  },
  {
    slug: "malachite-green",
    name: "Malachite green",
    unit: "mg/L",
    bandEdges: [0, 0.05, 0.1, 0.15, 0.2, 0.3],
    plausibleCeiling: 0.5,
    redoseHours: 72,
    watchDays: 10,
    description: "A dye used against protozoa; banned for food fish in many places. Check local rules.",
    stocks: [{ id: "mg-0-1", label: "Malachite green 0.1 % w/v", percent: 0.1, basis: "w/v", densityGPerMl: null }],
  },
  {
    slug: "praziquantel",
    name: "Praziquantel",
    unit: "mg/L",
    bandEdges: [0, 1, 2, 3, 5, 10],
    plausibleCeiling: 20,
    redoseHours: 168,
    watchDays: 14,
    description: "Against flukes and tapeworms; poorly soluble in water, so usually dosed from a prepared solution.",
    stocks: [{ id: "pzq-1", label: "Praziquantel solution 1 % w/v", percent: 1, basis: "w/v", densityGPerMl: null }],
  },
];

export const starterConditions: StarterCondition[] = [
  {
    slug: "none-preventive",
    name: "None / preventive",
    description: "Treated without a diagnosed condition, for example in quarantine.",
  },
  {
    slug: "white-spot",
    name: "White spot (Ichthyophthirius)",
    description: "Salt-grain white cysts on skin and fins.",
  },
  { slug: "velvet", name: "Velvet (Piscinoodinium)", description: "Gold or rust-coloured dust on the skin." },
  { slug: "ichthyobodo", name: "Ichthyobodo (costia)", description: "Grey-blue skin haze, clamped fins." },
  { slug: "chilodonella", name: "Chilodonella", description: "Skin and gill protozoan; haze and laboured breathing." },
  { slug: "trichodina", name: "Trichodina", description: "Skin and gill ciliates; flashing, excess mucus." },
  { slug: "gill-flukes", name: "Gill flukes (Dactylogyrus)", description: "Fast breathing, gills held open." },
  { slug: "skin-flukes", name: "Skin flukes (Gyrodactylus)", description: "Flashing, reddened skin, ragged fins." },
  {
    slug: "columnaris",
    name: "Columnaris",
    description: "Bacterial; saddle-shaped pale patches, mouth and gill lesions.",
  },
  { slug: "fin-rot", name: "Fin rot", description: "Fraying, receding fins, often with pale or red edges." },
  { slug: "fungus", name: "Fungus (Saprolegnia)", description: "Cottony growths on skin, fins or eggs." },
  { slug: "ulcers", name: "Ulcers", description: "Open red sores, often bacterial." },
  {
    slug: "anchor-worm",
    name: "Anchor worm and fish lice",
    description: "Visible crustacean parasites attached to the fish.",
  },
];
