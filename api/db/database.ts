import { Sequelize } from 'sequelize';
import { initModels } from './models';

/** One Sequelize instance a process, with every model initialised on it. */
export function createDatabase(url: string, poolMax = 10): Sequelize {
  const sequelize = new Sequelize(url, {
    dialect: 'postgres',
    logging: false,
    pool: { max: poolMax, min: 0, idle: 10_000, acquire: 10_000 },
    define: { underscored: true },
  });
  initModels(sequelize);
  return sequelize;
}
