/**
 * Demo accounts created by the seed. For local use only: the passwords are
 * published in the README, so never seed a production database.
 */
export const DEMO_WORKSPACE = { name: 'Riverside Cycling Club', slug: 'riverside-cycling' };

export const DEMO_USERS = {
  owner: { email: 'owner@riverside.example', name: 'Maren Osei', password: 'tailwind-maple-2026' },
  member: { email: 'analyst@riverside.example', name: 'Tomas Liedl', password: 'gravel-heron-2026' },
  staff: { email: 'support@partwise.example', name: 'Partwise Support', password: 'lantern-desk-2026' },
} as const;
