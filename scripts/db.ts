// Database chores for the bootstrap: `migrate`, `seed`, `rollback`.
import { createKnex, migrationConfig, seedConfig } from '../server/db/knex';

const url = process.env.DATABASE_URL;
if (!url) {
  console.error('DATABASE_URL is not set (the bootstrap sets it).');
  process.exit(2);
}
const knex = createKnex(url, 2);
const command = process.argv[2];
try {
  if (command === 'migrate') {
    const [, done] = await knex.migrate.latest(migrationConfig);
    console.log(`[kneepoint] migrations: ${done.length ? done.length + ' applied' : 'up to date'}`);
  } else if (command === 'seed') {
    await knex.seed.run(seedConfig);
    console.log('[kneepoint] demo scenario seeded');
  } else if (command === 'rollback') {
    await knex.migrate.rollback(migrationConfig, true);
  } else {
    throw new Error(`unknown command ${command}`);
  }
} catch (error) {
  console.error(error);
  process.exitCode = 1;
} finally {
  await knex.destroy();
}
