/**
 * The roles a person may have, shared by the database enum (db/schema/people.ts)
 * and the zod schemas. Pure: no imports from next or the database. It sits
 * beside the contract, below both db/ and lib/auth, so that the schema need
 * not import lib/auth (which imports db/).
 */
import { z } from 'zod';

/** admin: everything, people included; operator: all sites, edits setup, acknowledges; crew: their sites, acknowledges; owner: their sites, read only. */
export const ROLES = ['admin', 'operator', 'crew', 'owner'] as const;
export type Role = (typeof ROLES)[number];
export const roleSchema = z.enum(ROLES, { error: 'expected admin, operator, crew or owner' });

/** Roles that see only the sites assigned to them. */
export const SITE_BOUND_ROLES: readonly Role[] = ['crew', 'owner'];
