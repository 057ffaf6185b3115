/// <reference path="../.astro/types.d.ts" />

declare namespace App {
  interface Locals {
    user: { id: string; name: string; email: string } | null;
    sessionId: string | null;
    company: { id: string; name: string; slug: string } | null;
    role: import('./lib/auth/permissions').Role | null;
    memberships: import('./server/auth/session').Membership[];
    /** The active company's data version as the request began (report cache), when known. */
    dataVersion: number | null;
  }
}
