import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from "sequelize";
import type { TankGeometry } from "../../geometry/tank-volume";
import type { SignalProfile } from "../../validations/device";
import type { TankPurpose } from "../../forecast/purpose";

export class Site extends Model<InferAttributes<Site>, InferCreationAttributes<Site>> {
  declare id: CreationOptional<string>;
  declare organisation_id: string;
  declare name: string;
  declare time_zone: string;
  declare latitude: CreationOptional<number | null>;
  declare longitude: CreationOptional<number | null>;
  declare air_temp_c: CreationOptional<number | null>;
  declare humidity_pct: CreationOptional<number | null>;
  declare temperature_channel_id: CreationOptional<string | null>;
  declare escalation_delay_min: CreationOptional<number>;
  declare created_at: CreationOptional<Date>;
  declare updated_at: CreationOptional<Date>;
}

export type AssetKind = "tank" | "bay" | "point";

export class Asset extends Model<InferAttributes<Asset>, InferCreationAttributes<Asset>> {
  declare id: CreationOptional<string>;
  declare organisation_id: string;
  declare site_id: string;
  declare kind: AssetKind;
  declare name: string;
  declare mount_height_m: CreationOptional<number | null>;
  declare capacity_l: CreationOptional<number | null>;
  declare safe_fill_pct: CreationOptional<number | null>;
  declare reorder_pct: CreationOptional<number | null>;
  declare floor_distance_m: CreationOptional<number | null>;
  declare occupied_below_m: CreationOptional<number | null>;
  declare geometry: CreationOptional<TankGeometry | null>;
  declare bay_row: CreationOptional<number | null>;
  declare bay_col: CreationOptional<number | null>;
  declare bay_level: CreationOptional<string | null>;
  declare purpose: CreationOptional<TankPurpose | null>;
  declare created_at: CreationOptional<Date>;
  declare updated_at: CreationOptional<Date>;
}

export class Device extends Model<InferAttributes<Device>, InferCreationAttributes<Device>> {
  declare id: CreationOptional<string>;
  declare organisation_id: string;
  declare site_id: string;
  declare serial: string;
  declare name: string;
  declare profile: SignalProfile;
  declare clock_hz: CreationOptional<number | null>;
  declare prescaler: CreationOptional<number | null>;
  declare timer_bits: CreationOptional<number | null>;
  declare us_per_mm: CreationOptional<number | null>;
  declare zero_m: CreationOptional<number | null>;
  declare span_m: CreationOptional<number | null>;
  declare expected_interval_s: CreationOptional<number>;
  declare max_requests_per_min: CreationOptional<number>;
  declare firmware: CreationOptional<string | null>;
  declare last_seen_at: CreationOptional<Date | null>;
  declare battery_v: CreationOptional<number | null>;
  declare rssi_dbm: CreationOptional<number | null>;
  declare created_at: CreationOptional<Date>;
  declare updated_at: CreationOptional<Date>;
}

export class Channel extends Model<InferAttributes<Channel>, InferCreationAttributes<Channel>> {
  declare id: CreationOptional<string>;
  declare device_id: string;
  declare index: number;
  declare asset_id: CreationOptional<string | null>;
  declare min_range_m: CreationOptional<number>;
  declare max_range_m: CreationOptional<number>;
  declare face_offset_m: CreationOptional<number>;
  declare calibration_offset_m: CreationOptional<number>;
  declare calibration_scale: CreationOptional<number>;
  declare stated_accuracy_m: CreationOptional<number | null>;
}

export class DeviceKey extends Model<InferAttributes<DeviceKey>, InferCreationAttributes<DeviceKey>> {
  declare id: CreationOptional<string>;
  declare device_id: string;
  declare prefix: string;
  declare key_hash: Buffer;
  declare created_at: CreationOptional<Date>;
  declare revoked_at: CreationOptional<Date | null>;
}

// A fresh definition object per attribute: Sequelize annotates the object it is given.
const num = () => ({ type: DataTypes.DOUBLE, allowNull: true });

export function initFleetModels(sequelize: Sequelize) {
  const uuidPk = () => ({ type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 });
  Site.init(
    {
      id: uuidPk(),
      organisation_id: { type: DataTypes.UUID, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      time_zone: { type: DataTypes.TEXT, allowNull: false },
      latitude: num(),
      longitude: num(),
      air_temp_c: num(),
      humidity_pct: num(),
      temperature_channel_id: { type: DataTypes.UUID, allowNull: true },
      escalation_delay_min: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 15 },
      created_at: DataTypes.DATE,
      updated_at: DataTypes.DATE,
    },
    { sequelize, tableName: "sites" },
  );
  Asset.init(
    {
      id: uuidPk(),
      organisation_id: { type: DataTypes.UUID, allowNull: false },
      site_id: { type: DataTypes.UUID, allowNull: false },
      kind: { type: DataTypes.ENUM("tank", "bay", "point"), allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      mount_height_m: num(),
      capacity_l: num(),
      safe_fill_pct: num(),
      reorder_pct: num(),
      floor_distance_m: num(),
      occupied_below_m: num(),
      geometry: { type: DataTypes.JSONB, allowNull: true },
      bay_row: { type: DataTypes.INTEGER, allowNull: true },
      bay_col: { type: DataTypes.INTEGER, allowNull: true },
      bay_level: { type: DataTypes.TEXT, allowNull: true },
      purpose: { type: DataTypes.ENUM("supply", "process", "sump", "reserve"), allowNull: true },
      created_at: DataTypes.DATE,
      updated_at: DataTypes.DATE,
    },
    { sequelize, tableName: "assets" },
  );
  Device.init(
    {
      id: uuidPk(),
      organisation_id: { type: DataTypes.UUID, allowNull: false },
      site_id: { type: DataTypes.UUID, allowNull: false },
      serial: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      profile: { type: DataTypes.ENUM("echo", "capture", "pulse_coded", "duty_coded"), allowNull: false },
      clock_hz: num(),
      prescaler: { type: DataTypes.INTEGER, allowNull: true },
      timer_bits: { type: DataTypes.INTEGER, allowNull: true },
      us_per_mm: num(),
      zero_m: num(),
      span_m: num(),
      expected_interval_s: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 60 },
      max_requests_per_min: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 120 },
      firmware: { type: DataTypes.TEXT, allowNull: true },
      last_seen_at: { type: DataTypes.DATE, allowNull: true },
      battery_v: num(),
      rssi_dbm: num(),
      created_at: DataTypes.DATE,
      updated_at: DataTypes.DATE,
    },
    { sequelize, tableName: "devices" },
  );
  Channel.init(
    {
      id: uuidPk(),
      device_id: { type: DataTypes.UUID, allowNull: false },
      index: { type: DataTypes.SMALLINT, allowNull: false },
      asset_id: { type: DataTypes.UUID, allowNull: true },
      min_range_m: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.02 },
      max_range_m: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 4 },
      face_offset_m: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
      calibration_offset_m: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
      calibration_scale: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1 },
      stated_accuracy_m: num(),
    },
    { sequelize, tableName: "channels" },
  );
  DeviceKey.init(
    {
      id: uuidPk(),
      device_id: { type: DataTypes.UUID, allowNull: false },
      prefix: { type: DataTypes.TEXT, allowNull: false },
      key_hash: { type: DataTypes.BLOB, allowNull: false },
      created_at: DataTypes.DATE,
      revoked_at: { type: DataTypes.DATE, allowNull: true },
    },
    { sequelize, tableName: "device_keys", updatedAt: false },
  );
  Device.hasMany(Channel, { foreignKey: "device_id", as: "channels" });
  Channel.belongsTo(Device, { foreignKey: "device_id", as: "device" });
  Channel.belongsTo(Asset, { foreignKey: "asset_id", as: "asset" });
  Asset.belongsTo(Site, { foreignKey: "site_id", as: "site" });
  Device.belongsTo(Site, { foreignKey: "site_id", as: "site" });
}
