/**
 * What the setup screens read, one function a screen: `load…Screen` resolves
 * this request's database and viewer, `read…Screen` builds the view model
 * (tested without a browser). Pages render what comes back.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { canEditSetup, type Viewer } from '@/lib/auth/viewer';
import { SLUG } from '@/lib/contract/nameplate';
import type { Fleet } from '@/lib/contract/nameplate';
import { getDeviceCredentials } from '@/lib/devices/queries';
import { formOfNameplate, type FormValues } from '@/lib/setup/forms';
import { getFleetExport, getSetupSiteById, getSetupSites, getSetupUnitById, type SetupSite, type SetupUnit } from '@/lib/setup/queries';
import { requestContext } from '@/lib/request/context';

/** The setup index: every site the viewer sees with its units. */
export interface SetupScreen {
  readonly sites: SetupSite[];
  readonly unitCount: number;
  /** Whether the viewer may add, change and import (admin, operator). */
  readonly editable: boolean;
}

export async function loadSetupScreen(): Promise<SetupScreen> {
  const { db, viewer } = await requestContext();
  return readSetupScreen({ db, viewer });
}

export async function readSetupScreen({ db, viewer }: { db: Db; viewer: Viewer }): Promise<SetupScreen> {
  const sites = await getSetupSites({ db, viewer });
  return { sites, unitCount: sites.reduce((n, s) => n + s.units.length, 0), editable: canEditSetup(viewer) };
}

/** One site's setup page. */
export interface SetupSiteScreen {
  readonly site: { id: string; name: string; timezone: string };
  readonly units: SetupUnit[];
  readonly editable: boolean;
  /** The form's values as stored. */
  readonly form: FormValues;
}

/** undefined: no such site, or not the viewer's to see. */
export async function loadSetupSiteScreen(siteId: string): Promise<SetupSiteScreen | undefined> {
  if (!SLUG.test(siteId)) return undefined;
  const { db, viewer } = await requestContext();
  return readSetupSiteScreen({ db, viewer, siteId });
}

export async function readSetupSiteScreen({ db, viewer, siteId }: { db: Db; viewer: Viewer; siteId: string }): Promise<SetupSiteScreen | undefined> {
  const site = await getSetupSiteById({ db, viewer, siteId });
  if (!site) return undefined;
  const units = (await getSetupSites({ db, viewer })).find((s) => s.id === siteId)?.units ?? [];
  return {
    site: { id: site.id, name: site.name, timezone: site.timezone },
    units,
    editable: canEditSetup(viewer),
    form: { id: site.id, name: site.name, timezone: site.timezone },
  };
}

/** A unit's device account as the setup page shows it (times as ISO text). */
export interface DeviceAccountView {
  readonly username: string;
  readonly createdAt: string;
  readonly rotatedAt: string;
  readonly revokedAt: string | null;
}

/** One unit's setup page: its nameplate as form values, and its device account. */
export interface SetupUnitScreen {
  readonly site: { id: string; name: string };
  readonly unit: { id: string; name: string | undefined };
  /** The nameplate as stored, for a viewer who may not change it. */
  readonly nameplateJson: string;
  readonly form: FormValues;
  readonly account: DeviceAccountView | undefined;
  readonly editable: boolean;
}

export async function loadSetupUnitScreen(siteId: string, unitId: string): Promise<SetupUnitScreen | undefined> {
  if (!SLUG.test(siteId) || !SLUG.test(unitId)) return undefined;
  const { db, viewer } = await requestContext();
  return readSetupUnitScreen({ db, viewer, siteId, unitId });
}

export async function readSetupUnitScreen({ db, viewer, siteId, unitId }: { db: Db; viewer: Viewer; siteId: string; unitId: string }): Promise<SetupUnitScreen | undefined> {
  const [site, nameplate] = await Promise.all([getSetupSiteById({ db, viewer, siteId }), getSetupUnitById({ db, viewer, siteId, unitId })]);
  if (!site || !nameplate) return undefined;
  const account = await getDeviceCredentials({ db, viewer, siteId, unitId });
  return {
    site: { id: site.id, name: site.name },
    unit: { id: nameplate.id, name: nameplate.name },
    nameplateJson: JSON.stringify(nameplate, null, 2),
    form: formOfNameplate(nameplate),
    account: account && {
      username: account.username,
      createdAt: account.createdAt.toISOString(),
      rotatedAt: account.rotatedAt.toISOString(),
      revokedAt: account.revokedAt?.toISOString() ?? null,
    },
    editable: canEditSetup(viewer),
  };
}

/** The new-unit page: the sites a unit can go on, and the one asked for (`?site=`). */
export interface NewUnitScreen {
  readonly sites: Array<{ id: string; name: string }>;
  readonly chosen: { id: string; name: string } | undefined;
  /** The form's starting values. */
  readonly form: FormValues;
}

const siteParam = z.union([z.string().max(200), z.array(z.string().max(200)).max(10)]).optional();

export async function loadNewUnitScreen(site: unknown): Promise<NewUnitScreen> {
  const { db, viewer } = await requestContext();
  return readNewUnitScreen({ db, viewer, site });
}

export async function readNewUnitScreen({ db, viewer, site }: { db: Db; viewer: Viewer; site: unknown }): Promise<NewUnitScreen> {
  const parsed = siteParam.safeParse(site);
  const asked = parsed.success ? (Array.isArray(parsed.data) ? parsed.data[0] : parsed.data) : undefined;
  const sites = (await getSetupSites({ db, viewer })).map((s) => ({ id: s.id, name: s.name }));
  const chosen = sites.find((s) => s.id === asked);
  return { sites, chosen, form: { siteId: chosen?.id ?? sites[0]?.id ?? '', kind: 'wind', magnet: 'ndfeb', keRefC: '20' } };
}

/** The viewer's fleet as FLEET.json, with the file name of today's download. */
export async function loadFleetExport(): Promise<{ fleet: Fleet; fileName: string }> {
  const { db, viewer, nowMs } = await requestContext();
  return { fleet: await getFleetExport({ db, viewer }), fileName: `FLEET-${new Date(nowMs).toISOString().slice(0, 10)}.json` };
}
