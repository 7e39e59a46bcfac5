import { eq } from "drizzle-orm";
import { db, schema } from "./db";

export async function findUserIdByEmail(email: string): Promise<string | null> {
  const [row] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, email.toLowerCase()));
  return row?.id ?? null;
}
