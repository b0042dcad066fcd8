import type { FieldGroup } from './profileForm';

export const machineFieldGroups: FieldGroup[] = [
  { title: 'Machine', fields: [{ key: 'name', label: 'Name', kind: 'text', hint: 'Unique within the lab, as it is labelled on the floor.' }] },
  {
    title: 'Chamber',
    fields: [
      { key: 'chamberMm', label: 'Usable build volume', unit: 'mm', kind: 'triple', hint: 'Width, depth and height the laser can reach.' },
      { key: 'layerHeightsMm', label: 'Layer heights', unit: 'mm', kind: 'list', hint: 'Comma-separated, e.g. 0.1, 0.12' },
      { key: 'chamberCount', label: 'Swappable chambers', kind: 'number', hint: 'With 2 or more the next build starts while the last one cools outside.' },
    ],
  },
  {
    title: 'Laser and timing',
    fields: [
      { key: 'laserPowerW', label: 'Laser power', unit: 'W', kind: 'number' },
      { key: 'scannerMaxSpeedMmPerS', label: 'Scanner top speed', unit: 'mm/s', kind: 'number', hint: 'The scan speed is held at this when the energy density would ask for more.' },
      { key: 'recoatSeconds', label: 'Recoat time per layer', unit: 's', kind: 'number' },
      { key: 'minLayerSeconds', label: 'Minimum layer time', unit: 's', kind: 'number', hint: '0 when the machine has none.' },
      { key: 'preheatSeconds', label: 'Preheat time', unit: 'min', kind: 'number', scale: 60, hint: 'From loading the chamber to the first layer.' },
    ],
  },
  {
    title: 'Cooling',
    fields: [
      {
        key: 'coolingSurfaceWPerM2K',
        label: 'Cake surface coefficient',
        unit: 'W/(m²·K)',
        kind: 'number',
        hint: 'Heat lost from the cake faces to the surroundings; still air is about 5–10.',
      },
      { key: 'removalTempC', label: 'Removal temperature', unit: '°C', kind: 'number', hint: "The chamber may leave the machine once the cake's core is below this." },
      { key: 'handlingTempC', label: 'Handling temperature', unit: '°C', kind: 'number', hint: "The cake may be broken out by hand below this. Set it from the machine maker's instructions and the lab's local codes." },
      { key: 'ambientTempC', label: 'Room temperature', unit: '°C', kind: 'number' },
    ],
  },
  {
    title: 'Costs',
    fields: [
      { key: 'hourlyRate', label: 'Machine rate', unit: '¤/h', kind: 'number', hint: 'Charged for every hour the machine is held.' },
      { key: 'labourHoursPerBuild', label: 'Labour per build', unit: 'h', kind: 'number', hint: 'Setup, breakout and cleaning.' },
      { key: 'labourRate', label: 'Labour rate', unit: '¤/h', kind: 'number' },
      { key: 'electricalPowerKw', label: 'Electrical draw', unit: 'kW', kind: 'number', hint: 'Mean draw while preheating and printing.' },
      { key: 'energyPricePerKWh', label: 'Energy price', unit: '¤/kWh', kind: 'number' },
      {
        key: 'inertGasM3PerHour',
        label: 'Inert gas flow',
        unit: 'm³/h',
        kind: 'number',
        hint: '0 when the machine prints in air. Nitrogen can asphyxiate: ventilate and monitor oxygen as local codes require.',
      },
      { key: 'inertGasPricePerM3', label: 'Inert gas price', unit: '¤/m³', kind: 'number' },
    ],
  },
];

export const materialFieldGroups: FieldGroup[] = [
  { title: 'Material', fields: [{ key: 'name', label: 'Name', kind: 'text', hint: 'Unique within the lab.' }] },
  {
    title: 'Powder',
    fields: [
      { key: 'solidDensityGPerCm3', label: 'Solid density', unit: 'g/cm³', kind: 'number', hint: 'Of a fused part: gives part mass.' },
      { key: 'bulkDensityGPerCm3', label: 'Bulk density', unit: 'g/cm³', kind: 'number', hint: 'Of packed loose powder, below the solid density: gives the loose powder in the cake.' },
      { key: 'refreshRatio', label: 'Refresh ratio', unit: '0–1', kind: 'number', hint: 'Share of fresh powder in each fill, e.g. 0.3' },
      { key: 'pricePerKg', label: 'Price', unit: '¤/kg', kind: 'number' },
    ],
  },
  {
    title: 'Losses',
    fields: [
      { key: 'sievingLossShare', label: 'Sieving loss', unit: '0–1', kind: 'number', hint: 'Share of the loose powder lost at sieving, e.g. 0.02' },
      { key: 'crustLossShare', label: 'Crust', unit: '0–1', kind: 'number', hint: "Powder stuck to the parts and blasted off, as a share of the parts' mass." },
      { key: 'feedSurplusShare', label: 'Feed surplus', unit: '0–1', kind: 'number', hint: "Powder spread past the cake and not recovered, as a share of the cake's mass." },
    ],
  },
  {
    title: 'Sintering',
    fields: [
      { key: 'defaultLayerHeightMm', label: 'Default layer height', unit: 'mm', kind: 'number' },
      { key: 'volumetricEnergyDensityJPerMm3', label: 'Energy density', unit: 'J/mm³', kind: 'number', hint: 'E_V = P / (v · h · t); polyamide is about 0.2' },
      { key: 'hatchSpacingMm', label: 'Hatch spacing', unit: 'mm', kind: 'number' },
      { key: 'contourPasses', label: 'Contour passes', kind: 'number', hint: 'Around each cross-section; 0 for none.' },
      { key: 'bedTempC', label: 'Bed temperature', unit: '°C', kind: 'number', hint: 'While printing: where cooling starts. Above the removal temperature.' },
      { key: 'powderConductivityWPerMK', label: 'Powder conductivity', unit: 'W/(m·K)', kind: 'number', hint: 'Of the packed powder; nylon is about 0.1' },
      { key: 'powderHeatCapacityJPerKgK', label: 'Powder heat capacity', unit: 'J/(kg·K)', kind: 'number' },
    ],
  },
  {
    title: 'Spacing and margins',
    fields: [
      { key: 'spacingMm', label: 'Gap between parts', unit: 'mm', kind: 'number' },
      { key: 'marginXyMm', label: 'Side wall margin', unit: 'mm', kind: 'number' },
      { key: 'marginBottomMm', label: 'Floor margin', unit: 'mm', kind: 'number' },
      { key: 'marginTopMm', label: 'Top margin', unit: 'mm', kind: 'number' },
    ],
  },
];
