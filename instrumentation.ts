/** Runs once when a Next server starts: migrate the database and seed the demo (first start only). */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { prepareDatabase } = await import('./lib/db/setup');
  await prepareDatabase();
}
