import { withAuth } from 'next-auth/middleware';

/**
 * The coarse gate only: signed-out visitors of the online desk screens go to the sign-in page.
 * Field screens are static shells that must open offline, so they are not gated here; every API
 * route checks the session and the permission itself (lib/http/handler, lib/auth/permissions).
 */
export default withAuth({ pages: { signIn: '/signin' } });

export const config = { matcher: ['/admin/:path*', '/manage/:path*', '/merge/:path*', '/ledger/:path*', '/sitrep/:path*', '/mail/:path*'] };
