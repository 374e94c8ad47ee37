// The demo fleet (sites, assets, devices) arrives with the ingest work; until then there is nothing to add.
export async function seedDemoFleet(_opts: { organisationId?: string; onlyKeys?: boolean }): Promise<void> {}
