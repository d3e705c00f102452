import { json, route } from '@/lib/http';

/**
 * GET /api/health — a fixed answer with no database access and no session: for a load
 * balancer's health check, and the "bare route" the HTTP benchmark compares the others with.
 */
export const GET = route(async () => json({ ok: true }));
