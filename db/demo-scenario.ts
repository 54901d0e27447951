import type { Role } from "@/shared/roles";

/** An invented organisation: two fire stations and a dive-training centre in three time zones. */
export const demoOrganisation = "Tidewater Rescue & Dive Group";

export const demoSites = [
  { code: "marrow-bay", name: "Marrow Bay Fire Station", timeZone: "Europe/London", address: "4 Quay Road, Marrow Bay", profile: "fire" },
  { code: "heronfold-ridge", name: "Heronfold Ridge Fire Station", timeZone: "Europe/Oslo", address: "Ridgeveien 12, Heronfold Ridge", profile: "fire" },
  { code: "cobalt-reef", name: "Cobalt Reef Dive Centre", timeZone: "Europe/Malta", address: "Triq il-Blu 7, Cobalt Reef", profile: "dive" },
] as const;

export const demoModels = [
  { name: "Skua 80", maker: "Tarnbeck Compression", stages: 3, ratedDeliveryLpm: 80, ratedPressureBar: 225 },
  { name: "Petrel 250", maker: "Tarnbeck Compression", stages: 3, ratedDeliveryLpm: 250, ratedPressureBar: 330 },
  { name: "Gannet 320", maker: "Kelpmoor Air Works", stages: 4, ratedDeliveryLpm: 320, ratedPressureBar: 350 },
  { name: "Fulmar 450", maker: "Kelpmoor Air Works", stages: 4, ratedDeliveryLpm: 450, ratedPressureBar: 420 },
] as const;

type DemoModelName = (typeof demoModels)[number]["name"];
type DemoSiteCode = (typeof demoSites)[number]["code"];

export const demoCompressors: {
  site: DemoSiteCode;
  model: DemoModelName;
  name: string;
  serial: string;
  deviceId: string;
  stopPressureBar: number;
  restartPressureBar: number;
  bankVolumeL: number;
}[] = [
  { site: "marrow-bay", model: "Fulmar 450", name: "MB-1 Main", serial: "KAW-450-2019-0412", deviceId: "mb-main", stopPressureBar: 414, restartPressureBar: 370, bankVolumeL: 200 },
  { site: "marrow-bay", model: "Skua 80", name: "MB-2 Portable", serial: "TBC-080-2022-1177", deviceId: "mb-portable", stopPressureBar: 200, restartPressureBar: 170, bankVolumeL: 50 },
  { site: "heronfold-ridge", model: "Gannet 320", name: "HR-1 Bay compressor", serial: "KAW-320-2017-0098", deviceId: "hr-bay", stopPressureBar: 330, restartPressureBar: 295, bankVolumeL: 150 },
  { site: "heronfold-ridge", model: "Petrel 250", name: "HR-2 Workshop", serial: "TBC-250-2021-0733", deviceId: "hr-workshop", stopPressureBar: 300, restartPressureBar: 265, bankVolumeL: 100 },
  { site: "cobalt-reef", model: "Petrel 250", name: "CR-1 Fill station", serial: "TBC-250-2020-0561", deviceId: "cr-fill", stopPressureBar: 300, restartPressureBar: 260, bankVolumeL: 200 },
  { site: "cobalt-reef", model: "Gannet 320", name: "CR-2 Bank charger", serial: "KAW-320-2023-0214", deviceId: "cr-bank", stopPressureBar: 330, restartPressureBar: 290, bankVolumeL: 300 },
  { site: "cobalt-reef", model: "Skua 80", name: "CR-3 Boat unit", serial: "TBC-080-2024-1402", deviceId: "cr-boat", stopPressureBar: 200, restartPressureBar: 165, bankVolumeL: 0 },
];

export const DEMO_PASSWORD = "airkeep-demo";

export const demoUsers: { role: Role; name: string; sites?: DemoSiteCode[] }[] = [
  { role: "viewer", name: "Vera Lindqvist" },
  { role: "supervisor", name: "Sam Okafor" },
  { role: "technician", name: "Tomasz Wren" },
  { role: "engineer", name: "Elin Haugen" },
  { role: "manager", name: "Maya Castell" },
  { role: "admin", name: "Ade Brightwater" },
];

export const demoEmail = (role: Role) => `${role}@airkeep.demo`;
