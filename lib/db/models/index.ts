import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import { getSequelize } from "../sequelize";
import type { Role } from "../../auth/permissions";
import type { Clock, DecimalSeparator } from "../../format/display";
import type { UnitSystem } from "../../units/units";
import { initFleetModels } from "./fleet";

export { Asset, Channel, Device, DeviceKey, Site, type AssetKind } from "./fleet";

export class Organisation extends Model<InferAttributes<Organisation>, InferCreationAttributes<Organisation>> {
  declare id: CreationOptional<string>;
  declare name: string;
  declare unit_system: CreationOptional<UnitSystem>;
  declare decimal_separator: CreationOptional<DecimalSeparator>;
  declare clock: CreationOptional<Clock>;
}

export type UserStatus = "invited" | "active" | "deactivated";

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<string>;
  declare organisation_id: string;
  declare email: string;
  declare name: CreationOptional<string>;
  declare role: Role;
  declare status: CreationOptional<UserStatus>;
  declare password_hash: CreationOptional<string | null>;
  declare session_version: CreationOptional<number>;
  /** A viewer's sites (partner scope); null is every site of the organisation. */
  declare site_ids: CreationOptional<string[] | null>;
  /** Own display settings; null follows the organisation's. */
  declare unit_system: CreationOptional<UnitSystem | null>;
  declare decimal_separator: CreationOptional<DecimalSeparator | null>;
  declare clock: CreationOptional<Clock | null>;
  declare created_at: CreationOptional<Date>;
}

export class Invite extends Model<InferAttributes<Invite>, InferCreationAttributes<Invite>> {
  declare id: CreationOptional<string>;
  declare user_id: string;
  declare invited_by: string | null;
  declare expires_at: Date;
  declare used_at: CreationOptional<Date | null>;
}

export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>;
  declare organisation_id: string;
  declare actor_user_id: string | null;
  declare actor_label: string;
  declare action: string;
  declare entity_type: string;
  declare entity_id: string | null;
  declare details: CreationOptional<Record<string, unknown>>;
  declare at: CreationOptional<Date>;
}

function defineModels(sequelize: Sequelize) {
  const uuidPk = () => ({ type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 });

  Organisation.init(
    {
      id: uuidPk(),
      name: { type: DataTypes.TEXT, allowNull: false },
      unit_system: { type: DataTypes.TEXT, allowNull: false, defaultValue: "si" },
      decimal_separator: { type: DataTypes.TEXT, allowNull: false, defaultValue: "." },
      clock: { type: DataTypes.TEXT, allowNull: false, defaultValue: "24h" },
    },
    { sequelize, tableName: "organisations" },
  );

  User.init(
    {
      id: uuidPk(),
      organisation_id: { type: DataTypes.UUID, allowNull: false },
      email: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
      role: { type: DataTypes.ENUM("admin", "operator", "technician", "viewer"), allowNull: false },
      status: { type: DataTypes.ENUM("invited", "active", "deactivated"), allowNull: false, defaultValue: "invited" },
      password_hash: { type: DataTypes.TEXT, allowNull: true },
      session_version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      site_ids: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: true },
      unit_system: { type: DataTypes.TEXT, allowNull: true },
      decimal_separator: { type: DataTypes.TEXT, allowNull: true },
      clock: { type: DataTypes.TEXT, allowNull: true },
      created_at: DataTypes.DATE,
    },
    {
      sequelize,
      tableName: "users",
      defaultScope: { attributes: { exclude: ["password_hash"] } },
      scopes: { withPassword: { attributes: { include: ["password_hash"] } } },
    },
  );

  Invite.init(
    {
      id: uuidPk(),
      user_id: { type: DataTypes.UUID, allowNull: false },
      invited_by: { type: DataTypes.UUID, allowNull: true },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      used_at: { type: DataTypes.DATE, allowNull: true },
    },
    { sequelize, tableName: "invites", updatedAt: false },
  );

  AuditEntry.init(
    {
      id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
      organisation_id: { type: DataTypes.UUID, allowNull: false },
      actor_user_id: { type: DataTypes.UUID, allowNull: true },
      actor_label: { type: DataTypes.TEXT, allowNull: false },
      action: { type: DataTypes.TEXT, allowNull: false },
      entity_type: { type: DataTypes.TEXT, allowNull: false },
      entity_id: { type: DataTypes.TEXT, allowNull: true },
      details: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      at: { type: DataTypes.DATE, defaultValue: DataTypes.NOW },
    },
    { sequelize, tableName: "audit_log", timestamps: false },
  );

  initFleetModels(sequelize);
}

// Once per process, when this module is first loaded: importing a model is all it takes to use it.
// Creating the instance opens no connection.
defineModels(getSequelize());
