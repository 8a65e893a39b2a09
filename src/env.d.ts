/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    user: { id: string; name: string; email: string } | null;
    session: { id: string; activeOrganizationId?: string | null } | null;
    organization: { id: string; name: string; slug: string } | null;
    role: import('./lib/auth/permissions').Role | null;
  }
}
