"use client";

import Link from "next/link";
import type { ComponentProps } from "react";
import { withOrg } from "./fetch";

/** A link to a portal page that keeps this tab's organisation in the address. */
export function OrgLink({ href, ...rest }: Omit<ComponentProps<typeof Link>, "href"> & { href: string }) {
  return <Link href={withOrg(href)} {...rest} />;
}
