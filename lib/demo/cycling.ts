/**
 * Invented demo data: ride logs of a community cycling club, in four loose ride
 * groups. Deterministic for a seed so the seeded calculator is the same everywhere.
 * Every number here is made up for the demo; none comes from a real club.
 */
export const DEMO_COLUMNS = ['rider', 'avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m', 'home_side'] as const;

interface Group {
  n: number;
  speed: [number, number];
  distance: [number, number];
  climb: [number, number];
  /** Correlation of speed with weekly distance inside the group. */
  speedDistance: number;
}

const GROUPS: Group[] = [
  { n: 150, speed: [19.5, 1.7], distance: [55, 16], climb: [170, 55], speedDistance: 0.3 },
  { n: 130, speed: [25, 1.5], distance: [140, 28], climb: [430, 110], speedDistance: 0.4 },
  { n: 70, speed: [22.5, 1.8], distance: [105, 24], climb: [1050, 200], speedDistance: 0.2 },
  { n: 60, speed: [31, 1.7], distance: [255, 42], climb: [640, 140], speedDistance: 0.5 },
];

const SIDES = ['north', 'river', 'east', 'hills'];

function mulberry32(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function gaussianPair(rand: () => number): [number, number] {
  const u = Math.max(rand(), 1e-12);
  const v = rand();
  const r = Math.sqrt(-2 * Math.log(u));
  return [r * Math.cos(2 * Math.PI * v), r * Math.sin(2 * Math.PI * v)];
}

export interface DemoRide {
  rider: string;
  avg_speed_kmh: number;
  weekly_distance_km: number;
  climb_per_ride_m: number;
  home_side: string;
}

export function demoRides(seed = 20261201): DemoRide[] {
  const rand = mulberry32(seed);
  const rows: DemoRide[] = [];
  let index = 0;
  for (const g of GROUPS) {
    for (let i = 0; i < g.n; i++) {
      const [z1, z2] = gaussianPair(rand);
      const [z3] = gaussianPair(rand);
      const speed = g.speed[0] + g.speed[1] * z1;
      const zd = g.speedDistance * z1 + Math.sqrt(1 - g.speedDistance ** 2) * z2;
      const distance = Math.max(8, g.distance[0] + g.distance[1] * zd);
      const climb = Math.max(20, g.climb[0] + g.climb[1] * z3);
      rows.push({
        rider: `R${String(++index).padStart(3, '0')}`,
        avg_speed_kmh: Math.round(speed * 10) / 10,
        weekly_distance_km: Math.round(distance),
        climb_per_ride_m: Math.round(climb / 5) * 5,
        home_side: SIDES[Math.floor(rand() * SIDES.length)],
      });
    }
  }
  // Shuffle so the file does not list the groups in blocks.
  for (let i = rows.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [rows[i], rows[j]] = [rows[j], rows[i]];
  }
  return rows;
}

export function demoRidesCsv(seed?: number): string {
  const rows = demoRides(seed);
  return [DEMO_COLUMNS.join(','), ...rows.map((r) => DEMO_COLUMNS.map((c) => r[c]).join(','))].join('\n') + '\n';
}
