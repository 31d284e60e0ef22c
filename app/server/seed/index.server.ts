import { seedUsers } from "./users.server";
import { seedGarage } from "./garage.server";
import { seedSessions } from "./sessions.server";

/**
 * Seeds the invented demo scenario. Idempotent: safe on every start; it only inserts what is
 * missing and never deletes or overwrites rows. Sub-seeders run in order, each after the one
 * whose rows it needs.
 */
export async function seedDemo(): Promise<void> {
  await seedUsers();
  await seedGarage();
  // Demo sessions through the server's ingest code (needs the team, its members and the Garage).
  await seedSessions();
}
