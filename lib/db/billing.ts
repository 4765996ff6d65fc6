import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { getDb } from "./client";
import { billingAccounts, billingContacts } from "./schema-billing";

export async function listContacts(organizationId: number) {
  return getDb().select({ id: billingContacts.id, email: billingContacts.email, name: billingContacts.name }).from(billingContacts).where(eq(billingContacts.organizationId, organizationId)).orderBy(asc(billingContacts.id));
}

/** Adds a contact; false when the address is already listed. */
export async function addContact({ organizationId, email, name }: { organizationId: number; email: string; name: string }): Promise<boolean> {
  const [r] = await getDb().insert(billingContacts).ignore().values({ organizationId, email, name });
  return r.affectedRows > 0;
}

/** Removes a contact of this organisation; false when there is no such contact here. */
export async function removeContact({ organizationId, id }: { organizationId: number; id: number }): Promise<boolean> {
  const [r] = await getDb().delete(billingContacts).where(and(eq(billingContacts.id, id), eq(billingContacts.organizationId, organizationId)));
  return r.affectedRows > 0;
}

export async function updateBillingDetails({ organizationId, billingName, billingAddress, taxId }: { organizationId: number; billingName: string; billingAddress: string; taxId: string }) {
  await getDb().update(billingAccounts).set({ billingName, billingAddress: billingAddress || null, taxId: taxId || null, updatedAt: new Date() }).where(eq(billingAccounts.organizationId, organizationId));
}
