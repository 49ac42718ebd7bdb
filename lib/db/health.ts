import { db, dialect } from './connection';

export async function healthCheck(): Promise<{ ok: true; database: string; buildId: string | null }> {
  const sequelize = await db();
  await sequelize.query('SELECT 1');
  return { ok: true, database: dialect(), buildId: process.env.NEXT_PUBLIC_BUILD_ID ?? null };
}
