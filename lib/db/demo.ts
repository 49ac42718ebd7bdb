/**
 * The Marrow Bend demo (PRODUCT.md, "Demo data"): an invented influenza-like illness in a
 * fictional district. Fixed ids so that links in the README and the tests stay stable.
 */
export const DEMO_PASSWORD = 'ebbcast-demo';

export const DEMO_IDS = {
  outbreak: '00000000-0000-4000-8000-00000000a001',
  teamNorth: '00000000-0000-4000-8000-00000000b001',
  teamLakeshore: '00000000-0000-4000-8000-00000000b002',
  alderCamp: '00000000-0000-4000-8000-00000000c001',
  northgateSchool: '00000000-0000-4000-8000-00000000c002',
  lakeshoreWard: '00000000-0000-4000-8000-00000000c003',
  fennelVillage: '00000000-0000-4000-8000-00000000c004',
  hollinCrossing: '00000000-0000-4000-8000-00000000c005',
} as const;

export const DEMO_USERS = [
  { email: 'field@marrowbend.example', name: 'Ada Okafor', role: 'field', teams: ['teamNorth'] },
  { email: 'field2@marrowbend.example', name: 'Tomas Reyes', role: 'field', teams: ['teamLakeshore'] },
  { email: 'coordinator@marrowbend.example', name: 'Mira Haldane', role: 'coordinator', teams: [] },
  { email: 'supervisor@marrowbend.example', name: 'Jon Ashby', role: 'supervisor', teams: [] },
  { email: 'admin@marrowbend.example', name: 'Priya Nair', role: 'admin', teams: [] },
] as const;

export const DEMO_SITES = [
  { key: 'alderCamp', name: 'Alder Camp', kind: 'camp', population: 3200, team: 'teamNorth' },
  { key: 'northgateSchool', name: 'Northgate School', kind: 'school', population: 860, team: 'teamNorth' },
  { key: 'hollinCrossing', name: 'Hollin Crossing', kind: 'village', population: 1900, team: 'teamNorth' },
  { key: 'lakeshoreWard', name: 'Lakeshore Ward', kind: 'ward', population: 4100, team: 'teamLakeshore' },
  { key: 'fennelVillage', name: 'Fennel Village', kind: 'village', population: 2600, team: 'teamLakeshore' },
] as const;

/** Day 0 of the demo outbreak: 24 days before the day the database was seeded. */
export function demoStartDate(today = new Date()): string {
  const d = new Date(Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), today.getUTCDate() - 24));
  return d.toISOString().slice(0, 10);
}
