import type { SessionDto } from '../../shared/schemas/auth.schema.ts';

export interface NavItem {
  to: string;
  label: string;
  /** Shown only when this returns true for the session. */
  isShown: (session: SessionDto) => boolean;
}

const always = () => true;

/** The main navigation, in order. */
export const NAV_ITEMS: NavItem[] = [
  { to: '/', label: 'Home', isShown: always },
  { to: '/studies', label: 'Studies', isShown: always },
  { to: '/admin/users', label: 'Users', isShown: (s) => s.can.manageUsers },
  { to: '/admin/mail', label: 'Sent mail', isShown: (s) => s.can.readSentMail },
  { to: '/images/upload', label: 'Upload', isShown: (s) => s.can.editStudies },
  { to: '/equipment', label: 'Equipment', isShown: always },
  { to: '/geometry', label: 'Geometry', isShown: always },
  { to: '/compare', label: 'Compare', isShown: always },
  { to: '/rooms', label: 'Rooms', isShown: always },
  { to: '/account', label: 'Account', isShown: always },
];
