/**
 * A passport instance per app (no global state between test apps): the local strategy checks
 * e-mail + password; the session stores only the user id and reloads the user on each request,
 * so a deleted account or a changed admin flag takes effect at once.
 */
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Db } from '../db/client.ts';
import { findUserById } from '../modules/users/queries.ts';
import { checkCredentials, toSessionUser } from '../modules/users/service.ts';

export function createPassport(db: Db): passport.PassportStatic {
  const instance = new passport.Passport() as passport.PassportStatic;
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      checkCredentials(db, email, password).then(
        (row) => done(null, row ? toSessionUser(row) : false),
        (error) => done(error),
      );
    }),
  );
  instance.serializeUser((user, done) => done(null, user.id));
  instance.deserializeUser((id: string, done) => {
    findUserById(db, id).then(
      (row) => done(null, row ? toSessionUser(row) : false),
      (error) => done(error),
    );
  });
  return instance;
}
