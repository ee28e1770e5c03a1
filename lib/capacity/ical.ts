import ical, { ICalEventBusyStatus, ICalEventStatus } from "ical-generator";
import type { ResourceKind } from "./schemas";

// One resource's bookings and maintenance windows as an iCalendar feed (RFC 5545). Event UIDs
// are stable per booking and SEQUENCE follows the booking's version, so a calendar that
// subscribes sees a moved booking change rather than a new one appear.

export type FeedBooking = {
  id: string;
  code: string;
  state: string;
  version: number;
  starts_at: Date;
  ends_at: Date;
  label: string;
};
export type FeedMaintenance = { id: string; starts_at: Date; ends_at: Date; reason: string };

const KIND_WORD: Record<ResourceKind, string> = { printer: "Build", wash_station: "Wash batch", furnace: "Furnace run" };
const PAGE: Record<ResourceKind, (id: string) => string> = {
  printer: (id) => `/builds/${id}`,
  wash_station: () => `/batches`,
  furnace: (id) => `/furnace-runs/${id}`,
};

export function resourceFeed(input: {
  shopName: string;
  resource: { id: string; kind: ResourceKind; name: string };
  bookings: FeedBooking[];
  maintenance: FeedMaintenance[];
  appUrl: string;
  now?: Date;
}): string {
  const { resource, appUrl } = input;
  const cal = ical({
    name: `${input.shopName}: ${resource.name}`,
    description: `Bookings and maintenance of ${resource.name}, planned in Hearth. Times are UTC.`,
    prodId: { company: "Hearth", product: "resource-feed", language: "EN" },
    ttl: 15 * 60,
  });
  const stamp = input.now ?? new Date();
  for (const b of input.bookings) {
    if (b.state === "cancelled" || b.state === "draft") continue;
    const word = KIND_WORD[resource.kind];
    cal.createEvent({
      id: `${resource.kind}-${b.id}@hearth`,
      sequence: b.version,
      stamp,
      start: b.starts_at,
      end: b.ends_at,
      summary: `${word} ${b.code}${b.label ? ` · ${b.label}` : ""}`,
      description: `${word} ${b.code} on ${resource.name}, ${b.state}.`,
      location: resource.name,
      url: `${appUrl}${PAGE[resource.kind](b.id)}`,
      status: ICalEventStatus.CONFIRMED,
      busystatus: ICalEventBusyStatus.BUSY,
    });
  }
  for (const m of input.maintenance) {
    cal.createEvent({
      id: `maintenance-${m.id}@hearth`,
      stamp,
      start: m.starts_at,
      end: m.ends_at,
      summary: `Maintenance: ${m.reason || resource.name}`,
      location: resource.name,
      status: ICalEventStatus.CONFIRMED,
      busystatus: ICalEventBusyStatus.OOF,
    });
  }
  return cal.toString();
}
