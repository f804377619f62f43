import type { Sequelize } from 'sequelize';
import { RoleAssignment, User } from '../modules/people/model';
import { RefreshToken } from '../modules/auth/model';
import { Machine } from '../modules/machines/model';

/** Initialise every model on one Sequelize instance and wire the associations. */
export function initModels(sequelize: Sequelize): void {
  User.initModel(sequelize);
  RoleAssignment.initModel(sequelize);
  RefreshToken.initModel(sequelize);
  Machine.initModel(sequelize);

  User.hasMany(RoleAssignment, { as: 'roleAssignments', foreignKey: 'userId' });
  RoleAssignment.belongsTo(User, { foreignKey: 'userId' });
  User.hasMany(RefreshToken, { foreignKey: 'userId' });
  RefreshToken.belongsTo(User, { foreignKey: 'userId' });
}
