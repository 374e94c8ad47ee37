import { Organisation } from "../db/models";

export async function fetchOrganisationName(organisationId: string): Promise<string> {
  const org = await Organisation.findByPk(organisationId);
  return org?.name ?? "";
}
