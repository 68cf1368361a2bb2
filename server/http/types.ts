import type { Request } from 'express';
import type { User } from '../../shared/schemas/auth';

declare module 'express-session' {
  interface SessionData {
    userId?: number;
  }
}

/** What the auth middleware attaches to every request (null when nobody is signed in). */
export interface AuthedRequest extends Request {
  user?: User | null;
}
