import { z } from "zod";

export const planChangeSchema = z.object({ plan: z.string().min(1, "Choose a plan.").max(32) });

export const contactSchema = z.object({
  email: z.string().trim().toLowerCase().email("Enter an e-mail address.").max(254),
  name: z.string().trim().min(1, "Enter a name.").max(160),
});

export const detailsSchema = z.object({
  billingName: z.string().trim().min(1, "Enter the name to print on invoices.").max(160),
  billingAddress: z.string().trim().max(500, "At most 500 characters."),
  taxId: z.string().trim().max(40, "At most 40 characters."),
});
