// The worker's stages over one claimed batch, as pure functions: convert → derive → health. Each
// stage returns what the next needs and none calls another; processBatch runs them in order. The
// database side (claim, load channels, encode, write, commit) lives in lib/worker/.

import type { BaySession } from "../../occupancy/bay";
import { buildTemperatureSeries, type TemperatureSample, type TemperatureSeries } from "./air-temperature";
import { initialChannelState, type ChannelState } from "./channel-state";
import { convertReading } from "./convert";
import { deriveChannel } from "./derive";
import { assessChannel, assessCrosstalk, emptyFlagChanges, type FlagChanges, type FlagTracker } from "./health";
import { PIPELINE_SETTINGS } from "./settings";
import type { ChannelConfig, Measurement, ReadingRow } from "./types";

export interface StoredChannelState {
  state: ChannelState;
  /** Set by the cycle's offline check. */
  offlineSince: Date | null;
}

export interface BatchInput {
  readings: readonly ReadingRow[];
  /** The configuration of every channel of the readings' devices. */
  channels: readonly ChannelConfig[];
  /** Saved state by channel id (missing = a channel never seen). */
  states: ReadonlyMap<string, StoredChannelState>;
  /** Stored temperature samples by site id, covering the batch's time span. */
  temperatureSamples: ReadonlyMap<string, readonly TemperatureSample[]>;
  /** Sites whose designated temperature channel is the key (channel id → site ids). */
  temperatureChannelSites: ReadonlyMap<string, readonly string[]>;
}

export interface NewTemperatureSample extends TemperatureSample {
  siteId: string;
}

/**
 * Looks channels up by device and index without building a key string per reading: a batch looks up
 * every one of its readings, and hashing a fresh key each time showed in the worker's profile.
 */
export function channelFinder(channels: readonly ChannelConfig[]): (deviceId: string, index: number) => ChannelConfig | null {
  const byDevice = new Map<string, Map<number, ChannelConfig>>();
  for (const channel of channels) {
    let indexes = byDevice.get(channel.device.id);
    if (!indexes) byDevice.set(channel.device.id, (indexes = new Map()));
    indexes.set(channel.index, channel);
  }
  return (deviceId, index) => byDevice.get(deviceId)?.get(index) ?? null;
}

// ── Stage 1: convert ────────────────────────────────────────────────────────────────────────────

export interface ConvertedBatch {
  converted: Measurement[];
  /** Samples to store from the readings of sites' temperature channels. */
  newTemperatureSamples: NewTemperatureSample[];
}

function plausibleTemp(t: number | null): t is number {
  return t !== null && Number.isFinite(t) && t >= PIPELINE_SETTINGS.readingTempMinC && t <= PIPELINE_SETTINGS.readingTempMaxC;
}

export function convertStage(input: BatchInput): ConvertedBatch {
  const findChannel = channelFinder(input.channels);
  const channelOf = input.readings.map((r) => findChannel(r.deviceId, r.channel));
  const newTemperatureSamples: NewTemperatureSample[] = [];
  if (input.temperatureChannelSites.size > 0) {
    input.readings.forEach((r, i) => {
      const channel = channelOf[i];
      if (!channel || !plausibleTemp(r.airTempC)) return;
      for (const siteId of input.temperatureChannelSites.get(channel.id) ?? []) {
        newTemperatureSamples.push({ siteId, atMs: r.at.getTime(), airTempC: r.airTempC });
      }
    });
  }
  const series = new Map<string, TemperatureSeries | null>();
  const seriesFor = (siteId: string): TemperatureSeries | null => {
    const cached = series.get(siteId);
    if (cached !== undefined) return cached;
    const samples = [...(input.temperatureSamples.get(siteId) ?? []), ...newTemperatureSamples.filter((s) => s.siteId === siteId)];
    const built = samples.length ? buildTemperatureSeries(samples) : null;
    series.set(siteId, built);
    return built;
  };
  const converted = input.readings.map((reading, i) => {
    const channel = channelOf[i];
    return convertReading({ reading, channel, siteSeries: channel ? seriesFor(channel.site.id) : null });
  });
  return { converted, newTemperatureSamples };
}

// ── Stage 2: derive ─────────────────────────────────────────────────────────────────────────────

export interface ChannelBatch {
  channel: ChannelConfig;
  measurements: Measurement[];
  state: ChannelState;
  offlineSince: Date | null;
}

export interface SessionRow extends BaySession {
  assetId: string;
  channelId: string;
}

export interface DerivedBatch {
  /** Readings whose channel is unknown: measurements with status invalid_config and no channel. */
  orphans: Measurement[];
  byChannel: ChannelBatch[];
  sessions: SessionRow[];
}

export function deriveStage({ converted }: ConvertedBatch, input: BatchInput): DerivedBatch {
  const groups = new Map<string, { channel: ChannelConfig; items: Measurement[] }>();
  const orphans: Measurement[] = [];
  for (const c of converted) {
    if (c.channel === null) {
      orphans.push(c);
      continue;
    }
    const group = groups.get(c.channel.id);
    if (group) group.items.push(c);
    else groups.set(c.channel.id, { channel: c.channel, items: [c] });
  }
  const byChannel: ChannelBatch[] = [];
  const sessions: SessionRow[] = [];
  for (const [channelId, { channel, items }] of groups) {
    const stored = input.states.get(channelId);
    const derived = deriveChannel(items, channel, stored?.state ?? initialChannelState());
    byChannel.push({ channel, measurements: derived.measurements, state: derived.state, offlineSince: stored?.offlineSince ?? null });
    if (channel.asset) for (const s of derived.sessions) sessions.push({ ...s, assetId: channel.asset.id, channelId });
  }
  return { orphans, byChannel, sessions };
}

// ── Stage 3: health ─────────────────────────────────────────────────────────────────────────────

export interface HealthBatch {
  flags: FlagChanges;
  /** Final state per channel id, to save. */
  states: Map<string, ChannelState>;
  /** Channels whose offline flag the batch clears (their first reading ended the silence), with when. */
  offlineCleared: { channelId: string; at: Date }[];
}

export function healthStage({ byChannel }: DerivedBatch): HealthBatch {
  const trackers = new Map<string, FlagTracker>();
  const states = new Map<string, ChannelState>();
  const offlineCleared: HealthBatch["offlineCleared"] = [];
  const devices = new Map<string, { pings: Record<number, number[]>; channelIds: Record<number, string> }>();

  for (const b of byChannel) {
    const health = assessChannel({ channel: b.channel, measurements: b.measurements, state: b.state, offlineSince: b.offlineSince });
    trackers.set(b.channel.id, health.tracker);
    states.set(b.channel.id, health.state);
    if (health.clearsOffline) offlineCleared.push({ channelId: b.channel.id, at: b.measurements[0].reading.at });

    const device = devices.get(b.channel.device.id) ?? { pings: {}, channelIds: {} };
    devices.set(b.channel.device.id, device);
    // The last ping before the batch counts too, so a pair split across two batches is still seen.
    const before = b.state.lastAtMs !== null ? [b.state.lastAtMs] : [];
    device.pings[b.channel.index] = before.concat(b.measurements.map((m) => m.reading.at.getTime()));
    device.channelIds[b.channel.index] = b.channel.id;
  }
  for (const device of devices.values()) {
    if (Object.keys(device.pings).length > 1) assessCrosstalk(device, trackers);
  }

  const flags = emptyFlagChanges();
  for (const [channelId, tracker] of trackers) {
    const { open, changes } = tracker.finish();
    states.set(channelId, { ...(states.get(channelId) as ChannelState), open });
    flags.clears.push(...changes.clears);
    flags.intervals.push(...changes.intervals);
    flags.opens.push(...changes.opens);
  }
  return { flags, states, offlineCleared };
}

// ── The three in order ──────────────────────────────────────────────────────────────────────────

export interface ProcessedBatch {
  measurements: Measurement[];
  sessions: SessionRow[];
  newTemperatureSamples: NewTemperatureSample[];
  flags: FlagChanges;
  states: Map<string, ChannelState>;
  offlineCleared: HealthBatch["offlineCleared"];
}

/**
 * The three stages in order, in turns: conversion, then derive and health a group of devices at a
 * time (channels and devices are independent there). It yields after each turn; the result is the
 * same whatever the grouping, and the measurements come channel by channel, each in time order.
 */
function* batchInTurns(input: BatchInput, devicesPerTurn: number): Generator<void, ProcessedBatch> {
  const converted = convertStage(input);
  yield;
  const turnOfDevice = new Map<string, number>();
  const turns: Measurement[][] = [];
  for (const m of converted.converted) {
    const deviceId = m.channel?.device.id ?? "";
    let turn = turnOfDevice.get(deviceId);
    if (turn === undefined) turnOfDevice.set(deviceId, (turn = Math.floor(turnOfDevice.size / devicesPerTurn)));
    (turns[turn] ??= []).push(m);
  }
  const out: ProcessedBatch = { measurements: [], sessions: [], newTemperatureSamples: converted.newTemperatureSamples, flags: emptyFlagChanges(), states: new Map(), offlineCleared: [] };
  for (const part of turns) {
    const derived = deriveStage({ converted: part, newTemperatureSamples: converted.newTemperatureSamples }, input);
    const health = healthStage(derived);
    for (const m of derived.orphans) out.measurements.push(m);
    for (const b of derived.byChannel) for (const m of b.measurements) out.measurements.push(m);
    for (const s of derived.sessions) out.sessions.push(s);
    out.flags.clears.push(...health.flags.clears);
    out.flags.intervals.push(...health.flags.intervals);
    out.flags.opens.push(...health.flags.opens);
    for (const [id, state] of health.states) out.states.set(id, state);
    for (const o of health.offlineCleared) out.offlineCleared.push(o);
    yield;
  }
  return out;
}

/** The three stages in order, in one go. */
export function processBatch(input: BatchInput): ProcessedBatch {
  const turns = batchInTurns(input, Infinity);
  for (;;) {
    const step = turns.next();
    if (step.done) return step.value;
  }
}

/**
 * processBatch with `pause` awaited between turns of `devicesPerTurn` devices. The worker computes one
 * batch while the database writes the one before; computing it in one go would hold the event loop
 * and leave that write's next statement (and its commit) waiting until it ended.
 */
export async function processBatchInSteps(input: BatchInput, pause: () => Promise<void>, devicesPerTurn = 50): Promise<ProcessedBatch> {
  const turns = batchInTurns(input, devicesPerTurn);
  for (;;) {
    const step = turns.next();
    if (step.done) return step.value;
    await pause();
  }
}
