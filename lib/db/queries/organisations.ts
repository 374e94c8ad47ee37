import { initModels, Organisation } from "../models";

export async function fetchOrganisationName(organisationId: string): Promise<string> {
  initModels();
  const org = await Organisation.findByPk(organisationId);
  return org?.name ?? "";
}
