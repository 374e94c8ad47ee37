import { initModels, Organisation } from "../db/models";

export async function fetchOrganisationName(organisationId: string): Promise<string> {
  initModels();
  const org = await Organisation.findByPk(organisationId);
  return org?.name ?? "";
}
