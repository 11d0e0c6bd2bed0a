import { migrator } from './migrator.ts';
import { sequelize } from './sequelize.ts';

const command = process.argv[2] ?? 'up';

try {
  if (command === 'up') {
    const done = await migrator.up();
    console.log(`migrations applied: ${done.length}`);
  } else if (command === 'down') {
    const undone = await migrator.down();
    console.log(`migrations reverted: ${undone.length}`);
  } else if (command === 'pending') {
    const pending = await migrator.pending();
    console.log(pending.map((m) => m.name).join('\n') || 'none pending');
  } else {
    console.error(`usage: migrate up|down|pending (got ${command})`);
    process.exitCode = 2;
  }
} finally {
  await sequelize.close();
}
