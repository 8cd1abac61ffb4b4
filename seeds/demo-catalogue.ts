import type { Db } from '../server/db.js';

/** Series and vintages of the demo workspace (filled in with the Catalogue). */
export async function seedDemoCatalogue(_db: Db, _people: Record<string, number>) {}
