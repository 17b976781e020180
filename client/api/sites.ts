import type { z } from 'zod';
import { Ok } from '@shared/common';
import { CartProfile, Site, type CartProfileBody, type CreateSiteBody, type UpdateSiteBody } from '@shared/sites';
import { http } from './http';

export const listSites = () => http('GET', '/api/sites', Site.array());
export const getSite = (siteId: number) => http('GET', `/api/sites/${siteId}`, Site);
export const createSite = (body: z.input<typeof CreateSiteBody>) => http('POST', '/api/sites', Site, { body });
export const updateSite = (siteId: number, body: z.input<typeof UpdateSiteBody>) => http('PATCH', `/api/sites/${siteId}`, Site, { body });
export const addCartProfile = (siteId: number, body: CartProfileBody) => http('POST', `/api/sites/${siteId}/cart-profiles`, CartProfile, { body });
export const updateCartProfile = (siteId: number, id: number, body: CartProfileBody) =>
  http('PUT', `/api/sites/${siteId}/cart-profiles/${id}`, CartProfile, { body });
export const deleteCartProfile = (siteId: number, id: number) => http('DELETE', `/api/sites/${siteId}/cart-profiles/${id}`, Ok);
