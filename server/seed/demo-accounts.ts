/** Invented demo accounts of the "Lantern Nuclei Survey" demo project (README lists them too). */
export const DEMO_ACCOUNTS = [
  { role: 'owner', name: 'Orla Demo-Owner', email: 'owner@example.org', password: 'lantern-owner-2026' },
  { role: 'analyst', name: 'Arun Demo-Analyst', email: 'analyst@example.org', password: 'lantern-analyst-2026' },
  { role: 'viewer', name: 'Vera Demo-Viewer', email: 'viewer@example.org', password: 'lantern-viewer-2026' },
] as const
