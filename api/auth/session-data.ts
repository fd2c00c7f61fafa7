import 'express-session';

declare module 'express-session' {
  interface SessionData {
    /** Synchronizer token for unsafe requests, created at sign-in. */
    csrfToken?: string;
    /** When the member signed in (ms since epoch): the absolute lifetime counts from here. */
    signedInAt?: number;
    /** Where to go after sign-in: always an app-relative path. */
    returnTo?: string;
  }
}

/** Our own cookie name: the framework default would advertise the stack. */
export const SESSION_COOKIE = 'rwb.sid';
