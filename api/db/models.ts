import type { Sequelize } from 'sequelize';
import { Invitation, RoleAssignment, User } from '../modules/people/model';
import { OutboxMessage } from '../modules/mail/model';
import { RefreshToken } from '../modules/auth/model';
import { Machine, MachineEvent, MachineSchedule } from '../modules/machines/model';
import { Photo } from '../modules/photos/model';
import { ProcedureVersion } from '../modules/procedures/model';
import { SetupRecord, StepEntry } from '../modules/records/model';
import { AuditEvent, RecordAddendum, RecordReturn, Signature } from '../modules/signoff/model';
import { BladeCutLog, BladeFitting, BladeType } from '../modules/blades/model';
import { Authorisation } from '../modules/competencies/model';

/** Initialise every model on one Sequelize instance and wire the associations. */
export function initModels(sequelize: Sequelize): void {
  User.initModel(sequelize);
  RoleAssignment.initModel(sequelize);
  Invitation.initModel(sequelize);
  OutboxMessage.initModel(sequelize);
  RefreshToken.initModel(sequelize);
  Machine.initModel(sequelize);
  MachineEvent.initModel(sequelize);
  MachineSchedule.initModel(sequelize);
  Photo.initModel(sequelize);
  ProcedureVersion.initModel(sequelize);
  SetupRecord.initModel(sequelize);
  StepEntry.initModel(sequelize);
  Signature.initModel(sequelize);
  RecordReturn.initModel(sequelize);
  RecordAddendum.initModel(sequelize);
  AuditEvent.initModel(sequelize);
  BladeType.initModel(sequelize);
  BladeFitting.initModel(sequelize);
  BladeCutLog.initModel(sequelize);
  Authorisation.initModel(sequelize);

  User.hasMany(RoleAssignment, { as: 'roleAssignments', foreignKey: 'userId' });
  RoleAssignment.belongsTo(User, { foreignKey: 'userId' });
  User.hasMany(Invitation, { as: 'invitations', foreignKey: 'userId' });
  User.hasMany(RefreshToken, { foreignKey: 'userId' });
  RefreshToken.belongsTo(User, { foreignKey: 'userId' });
  SetupRecord.belongsTo(Machine, { as: 'machine', foreignKey: 'machineId' });
  SetupRecord.belongsTo(ProcedureVersion, { as: 'procedureVersion', foreignKey: 'procedureVersionId' });
  SetupRecord.belongsTo(User, { as: 'startedBy', foreignKey: 'startedById' });
  SetupRecord.hasMany(StepEntry, { as: 'entries', foreignKey: 'recordId' });
  StepEntry.belongsTo(User, { as: 'enteredBy', foreignKey: 'enteredById' });
  StepEntry.belongsTo(User, { as: 'witnessedBy', foreignKey: 'witnessedById' });
  BladeFitting.belongsTo(BladeType, { as: 'bladeType', foreignKey: 'bladeTypeId' });
  BladeFitting.belongsTo(User, { as: 'fittedBy', foreignKey: 'fittedById' });
  BladeFitting.belongsTo(User, { as: 'removedBy', foreignKey: 'removedById' });
  BladeCutLog.belongsTo(User, { as: 'loggedBy', foreignKey: 'loggedById' });
  Authorisation.belongsTo(User, { as: 'person', foreignKey: 'personId' });
  Authorisation.belongsTo(User, { as: 'grantedBy', foreignKey: 'grantedById' });
  Authorisation.belongsTo(User, { as: 'endedBy', foreignKey: 'endedById' });
}
