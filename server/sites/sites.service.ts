import type { z } from 'zod';
import type { CartProfile, CartProfileBody, CreateSiteBody, Site, UpdateSiteBody } from '../../shared/sites';
import { audit } from '../audit/audit';
import type { Q } from '../db/knex';
import { AppError, notFound } from '../http/errors';
import * as repo from './sites.repository';

export const mustSite = async (db: Q, id: number): Promise<Site> => (await repo.getSite(db, id)) ?? Promise.reject(notFound('Site'));

const cartColumns = (b: CartProfileBody): repo.CartProfileColumns => ({ name: b.name, totes: b.totes, max_kg: b.maxKg, max_litres: b.maxLitres });

export async function sitesOf(db: Q, userId: number, role: Parameters<typeof repo.listSitesOf>[2]): Promise<Site[]> {
  const rows = await repo.listSitesOf(db, userId, role);
  return Promise.all(rows.map((r) => mustSite(db, r.id)));
}

export async function createSite(db: Q, userId: number, body: z.infer<typeof CreateSiteBody>): Promise<Site> {
  const id = await repo.insertSite(db, { code: body.code, name: body.name, timezone: body.timezone });
  if (id === null) throw new AppError('conflict', 'site_code_taken', `A site with code ${body.code} exists`);
  await audit(db, { siteId: id, userId, action: 'site.created', subject: body.code });
  return mustSite(db, id);
}

export async function updateSite(db: Q, siteId: number, userId: number, body: z.infer<typeof UpdateSiteBody>): Promise<Site> {
  await mustSite(db, siteId);
  await repo.updateSiteRow(db, siteId, {
    ...(body.name && { name: body.name }),
    ...(body.timezone && { timezone: body.timezone }),
    ...repo.settingsColumns(body.settings ?? {}),
  });
  await audit(db, { siteId, userId, action: 'site.updated', detail: body });
  return mustSite(db, siteId);
}

export async function addCartProfile(db: Q, siteId: number, body: CartProfileBody): Promise<CartProfile> {
  await mustSite(db, siteId);
  const id = await repo.saveCartProfile(db, siteId, cartColumns(body));
  if (id === null) throw new AppError('conflict', 'name_taken', `A cart profile named ${body.name} exists`);
  return (await repo.getCartProfile(db, siteId, id))!;
}

export async function changeCartProfile(db: Q, siteId: number, id: number, body: CartProfileBody): Promise<CartProfile> {
  if (!(await repo.updateCartProfile(db, siteId, id, cartColumns(body)))) throw notFound('Cart profile');
  return (await repo.getCartProfile(db, siteId, id))!;
}

export async function removeCartProfile(db: Q, siteId: number, id: number): Promise<void> {
  if (!(await repo.archiveCartProfile(db, siteId, id))) throw notFound('Cart profile');
}
