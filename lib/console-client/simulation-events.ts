"use client";

import { useEffect, useState } from "react";
import { consoleApi } from "./api";
import type { SimulationItem } from "./types";

export const isOver = (status: string) => status === "done" || status === "cancelled" || status === "failed";

/**
 * Follow one simulation's event stream while `follow` holds: the latest state it sent (undefined before the first
 * event). `onEnd` runs once with the final state, and the stream is closed (an EventSource would reconnect).
 */
export function useSimulationEvents(org: string, id: string, follow: boolean, onEnd?: (sim: SimulationItem) => void): SimulationItem | undefined {
  const [latest, setLatest] = useState<SimulationItem | undefined>(undefined);
  useEffect(() => {
    if (!follow) return;
    const source = new EventSource(consoleApi.simulationEventsHref(org, id));
    source.addEventListener("progress", (e) => setLatest(JSON.parse((e as MessageEvent<string>).data) as SimulationItem));
    source.addEventListener("end", (e) => {
      const sim = JSON.parse((e as MessageEvent<string>).data) as SimulationItem;
      source.close();
      setLatest(sim);
      onEnd?.(sim);
    });
    return () => source.close();
    // onEnd is a fresh closure each render; the stream is opened per simulation, not per render.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [org, id, follow]);
  return latest;
}
