/**
 * Demo accounts created by the seed. For local use only: the passwords are
 * published in the README, so never seed a production database.
 */
export const DEMO_WORKSPACE = { name: 'Riverside Cycling Club', slug: 'riverside-cycling' };

export const DEMO_USERS = {
  owner: { email: 'owner@riverside.example', name: 'Maren Osei', password: 'ride-owner-2026' },
  member: { email: 'analyst@riverside.example', name: 'Tomas Liedl', password: 'ride-analyst-2026' },
  staff: { email: 'support@partwise.example', name: 'Partwise Support', password: 'partwise-support-2026' },
} as const;
