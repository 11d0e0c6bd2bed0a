import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Role } from '../../shared/permissions.ts';
import { User } from '../models/user.model.ts';
import { verifyPassword } from './password.ts';

declare global {
  // Passport's user type, as every route sees it.
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface User {
      id: number;
      email: string;
      displayName: string;
      role: Role;
    }
  }
}

// A hash that is verified when the address is unknown, so a failed sign-in
// takes the same time whether or not the account exists.
const DECOY_HASH =
  'scrypt$131072$8$1$AAAAAAAAAAAAAAAAAAAAAA$AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA';

const toSessionUser = (user: User): Express.User => ({
  id: user.id,
  email: user.email,
  displayName: user.displayName,
  role: user.role,
});

/** Registers the local strategy and the session (de)serialisers. */
export function configurePassport(): passport.PassportStatic {
  passport.use(
    new LocalStrategy(
      { usernameField: 'email', passwordField: 'password' },
      (email, password, done) => {
        User.findOne({ where: { email: email.trim().toLowerCase() } })
          .then(async (user) => {
            const ok = await verifyPassword(
              password,
              user?.passwordHash ?? DECOY_HASH,
            );
            if (!user || !ok || user.disabledAt) return done(null, false);
            return done(null, toSessionUser(user));
          })
          .catch(done);
      },
    ),
  );
  passport.serializeUser((user, done) => done(null, String(user.id)));
  passport.deserializeUser((id: string, done) => {
    User.findByPk(Number(id))
      .then((user) =>
        done(null, user && !user.disabledAt ? toSessionUser(user) : false),
      )
      .catch(done);
  });
  return passport;
}
