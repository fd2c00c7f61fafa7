/**
 * Sign-in with GitHub's OAuth flow (passport-github2, with `state` and PKCE). In development
 * and tests the endpoints point at the local fake provider in api/fakes/github.ts.
 */
import passportModule from 'passport';
import { Strategy as GitHubStrategy, type Profile, type StrategyOptions } from 'passport-github2';
import type { AppContext } from '../context';
import { loadSessionUser, signInFromProvider } from '../users/service';
import type { AuthUser } from '../http/routes';

export const PROVIDER = 'github';

export function createPassport(ctx: AppContext): passportModule.PassportStatic {
  // One instance per app (not the module singleton), so several apps can live in one process.
  const passport = new passportModule.Passport() as passportModule.PassportStatic;
  const { github, config } = ctx;

  passport.use(
    PROVIDER,
    new GitHubStrategy(
      {
        clientID: github.clientId,
        clientSecret: github.clientSecret,
        callbackURL: `${config.appOrigin}/api/auth/github/callback`,
        authorizationURL: github.authorizationURL,
        tokenURL: github.tokenURL,
        userProfileURL: github.userProfileURL,
        userEmailURL: github.userEmailURL,
        scope: ['read:user', 'user:email'],
        // The types say string; passport-oauth2 wants `true` to keep state in the session.
        state: true as unknown as string,
        pkce: true,
      } as StrategyOptions,
      (_accessToken: string, _refreshToken: string, profile: Profile, done: (error: unknown, user?: AuthUser) => void) => {
        signInFromProvider(ctx, {
          provider: PROVIDER,
          providerUserId: String(profile.id),
          login: profile.username ?? `member-${profile.id}`,
          displayName: profile.displayName || profile.username || '',
          email: profile.emails?.[0]?.value ?? null,
          avatarUrl: profile.photos?.[0]?.value ?? null,
        }).then(
          (user) => done(null, user),
          (error: unknown) => done(error),
        );
      },
    ),
  );

  passport.serializeUser<number>((user, done) => done(null, (user as AuthUser).id));
  passport.deserializeUser<number>((id, done) => {
    // Fresh from the database on every request: a role change applies at once, and a
    // suspended (or deleted) member is treated as signed out.
    loadSessionUser(ctx, id).then(
      (user) => done(null, user ?? false),
      (error: unknown) => done(error),
    );
  });
  return passport;
}
