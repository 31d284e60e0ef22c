import { seedUsers } from "./users.server";
import { seedGarage } from "./garage.server";

/**
 * Seeds the invented demo scenario. Idempotent: safe on every start; it only inserts what is
 * missing and never deletes or overwrites rows. Sub-seeders run in order, each after the one
 * whose rows it needs.
 */
export async function seedDemo(): Promise<void> {
  await seedUsers();
  await seedGarage();
}
