// Invented demo club: every person, e-mail address and report here is made up for the demo.
export const DEMO_CLUB_NAME = "Millbrook Aquarium Circle (demo club)";
export const DEFAULT_DEMO_PASSWORD = "tanklore-demo";

export interface DemoPerson {
  email: string;
  name: string;
  role: "member" | "moderator" | "admin";
}

export const demoPeople: DemoPerson[] = [
  { email: "admin@example.org", name: "Orla Quillfeather", role: "admin" },
  { email: "moderator@example.org", name: "Tobin Marsh-Ellery", role: "moderator" },
  { email: "member@example.org", name: "Priya Sandwell", role: "member" },
  { email: "member2@example.org", name: "Jun Ettleby", role: "member" },
  { email: "keeper3@example.org", name: "Ines Vardalou", role: "member" },
  { email: "keeper4@example.org", name: "Caspar Lindqvern", role: "member" },
  { email: "keeper5@example.org", name: "Mona Treacleworth", role: "member" },
  { email: "keeper6@example.org", name: "Ade Okonrin", role: "member" },
  { email: "keeper7@example.org", name: "Freya Hollinsby", role: "member" },
  { email: "keeper8@example.org", name: "Rafael Quenby", role: "member" },
  { email: "keeper9@example.org", name: "Saoirse Denholt", role: "member" },
  { email: "keeper10@example.org", name: "Hal Brightwater", role: "moderator" },
];

/**
 * A made-up tolerance per group for the demo generator (mg/L of hydrogen peroxide at which harm
 * becomes likely). Invented so that the demo summaries have shape; not evidence of anything.
 */
export const demoPeroxideTolerance: Record<string, number> = {
  livebearers: 60,
  tetras: 40,
  "barbs-rasboras": 50,
  "goldfish-koi": 70,
  corydoras: 32,
  plecos: 38,
  "scaleless-catfish": 22,
  loaches: 24,
  "new-world-cichlids": 55,
  "african-cichlids": 60,
  "dwarf-cichlids": 34,
  anabantoids: 45,
  "killifish-rainbows": 40,
  "puffers-eels": 20,
  invertebrates: 18,
};

/** Deterministic pseudo-random numbers (mulberry32), so the demo is the same on every machine. */
export function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
