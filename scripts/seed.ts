// npm run db:seed — writes the demo scenario. With --if-empty it does nothing on a database
// that already has accounts (how npm start calls it).
import { pool } from "../app/.server/db";
import { isEmpty, seedDemo } from "../app/.server/seed";

const ifEmpty = process.argv.includes("--if-empty");
try {
  if (!(await isEmpty())) {
    if (ifEmpty) console.error("[seed] database already has accounts; leaving it as it is");
    else throw new Error("The database already has accounts; seed only an empty database.");
  } else {
    const { trialId } = await seedDemo({ withBrief: true });
    console.error(`[seed] demo program written (trial ${trialId})`);
  }
} finally {
  await pool.end();
}
