/** Assets (the appliance or equipment a job is on) and technicians. */
import type { Asset, Technician } from '../model/job';
import type { Database } from './schema';

/** Stores an asset, new or changed; resolves once written. */
export async function putAsset(db: Database, asset: Asset): Promise<void> {
  await db.put('assets', asset);
}

export function getAsset(db: Database, id: string): Promise<Asset | undefined> {
  return db.get('assets', id);
}

/** Every asset, by id. */
export async function assetsById(db: Database): Promise<Map<string, Asset>> {
  const assets = await db.getAll('assets');
  return new Map(assets.map((asset) => [asset.id, asset]));
}

/**
 * Assets at one customer and site with the same serial (or, without a serial, the same tag):
 * the same unit met again, so a new job can be put on it and show its history.
 */
export async function findSameAsset(db: Database, probe: Pick<Asset, 'customer' | 'site' | 'serial' | 'tag'>): Promise<Asset | undefined> {
  const key = (asset: Pick<Asset, 'serial' | 'tag'>) => (asset.serial?.trim() || asset.tag?.trim() || '').toLowerCase();
  const wanted = key(probe);
  if (wanted === '') return undefined;
  const assets = await db.getAll('assets');
  return assets.find(
    (asset) => key(asset) === wanted && asset.customer.trim().toLowerCase() === probe.customer.trim().toLowerCase(),
  );
}

export async function putTechnician(db: Database, technician: Technician): Promise<void> {
  await db.put('technicians', technician);
}

/** Every technician, by name. */
export async function listTechnicians(db: Database): Promise<Technician[]> {
  const technicians = await db.getAll('technicians');
  return technicians.sort((a, b) => a.name.localeCompare(b.name));
}
