import type { Role } from '../../shared/permissions.ts';

/** The demo's invented staff of Saltmarsh General Hospital. Demo only. */
export const DEMO_USERS: ReadonlyArray<{
  email: string;
  displayName: string;
  role: Role;
  password: string;
}> = [
  {
    email: 'admin@saltmarsh-general.example',
    displayName: 'Oriel Pennick',
    role: 'admin',
    password: 'demo-admin-2026',
  },
  {
    email: 'physicist@saltmarsh-general.example',
    displayName: 'Dr Tamsin Velloe',
    role: 'physicist',
    password: 'demo-physicist-2026',
  },
  {
    email: 'resident@saltmarsh-general.example',
    displayName: 'Kit Marrack',
    role: 'resident',
    password: 'demo-resident-2026',
  },
  {
    email: 'committee@saltmarsh-general.example',
    displayName: 'Bryony Tregear',
    role: 'committee',
    password: 'demo-committee-2026',
  },
];
