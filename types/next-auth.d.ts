import type { Role } from '@/lib/auth/roles';

declare module 'next-auth' {
  interface Session {
    user?: { id: string; email: string; name: string; role: Role; teamIds: string[]; outbreakIds: string[] };
    revoked?: boolean;
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    role?: Role;
    teamIds?: string[];
    outbreakIds?: string[];
    sessionVersion?: number;
    revoked?: boolean;
  }
}
