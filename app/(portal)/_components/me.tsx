"use client";

import { createContext, useContext } from "react";

export interface Me {
  user: { id: number; name: string; email: string; emailVerified: boolean };
  organization: { id: number; slug: string; name: string; plan: string };
  role: "admin" | "developer" | "billing";
  permissions: string[];
  memberships: { organizationId: number; slug: string; name: string; role: "admin" | "developer" | "billing" }[];
}

export const MeContext = createContext<{ me: Me | null; reload: () => void }>({ me: null, reload: () => {} });
export const useMe = () => useContext(MeContext);
export const has = (me: Me | null, perm: string) => !!me?.permissions.includes(perm);
