/** The public address of this installation (NEXTAUTH_URL), for links in messages. */
export function appUrl(pathAndQuery: string): string {
  const base = (process.env.NEXTAUTH_URL || 'http://localhost:3000').replace(/\/+$/, '');
  return `${base}${pathAndQuery.startsWith('/') ? '' : '/'}${pathAndQuery}`;
}
