// Connection settings shared by sequelize-cli (migrations, seeders) and the app (lib/db/index.ts).
const path = require('path');
const fs = require('fs');

// The .env files `next build` and `next start` read (.env.production.local, .env.local,
// .env.production, .env), read here too, so migrations, seeders, db:recheck and the backup scripts
// see the same configuration as the app. Variables set in the environment win; tests set their own.
if (process.env.NODE_ENV !== 'test') {
  require('@next/env').loadEnvConfig(process.cwd(), false, { info: () => {}, error: console.error });
}

function settings() {
  const url = process.env.DATABASE_URL;
  if (url && !url.startsWith('sqlite:')) {
    return { url, dialect: url.startsWith('postgres') ? 'postgres' : undefined, logging: false };
  }
  const file = url ? url.replace(/^sqlite:(\/\/)?/, '') : path.resolve(process.cwd(), 'data', 'oscillab.sqlite');
  fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  return { dialect: 'sqlite', storage: path.resolve(file), logging: false };
}

const current = settings();
module.exports = { development: current, test: current, production: current, settings };
