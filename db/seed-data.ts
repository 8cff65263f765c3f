import type { Db } from './connection';

/**
 * Seeds the demo lender's datasets. Filled in by the data-intake feature; until then the demo
 * organisation has users only.
 */
export async function seedDemoData(_db: Db): Promise<void> {}
