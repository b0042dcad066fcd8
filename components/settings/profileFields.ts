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
      { key: 'recoatSeconds', label: 'Recoat time per layer', unit: 's', kind: 'number' },
      { key: 'preheatSeconds', label: 'Preheat time', unit: 's', kind: 'number' },
    ],
  },
  {
    title: 'Cooling',
    fields: [
      { key: 'coolingInMachinePerHour', label: 'Cooling constant in the machine', unit: '1/h', kind: 'number', hint: "Newton's law constant for the reference cake." },
      { key: 'coolingOutsidePerHour', label: 'Cooling constant outside', unit: '1/h', kind: 'number' },
      { key: 'removalTempC', label: 'Removal temperature', unit: '°C', kind: 'number', hint: 'The chamber may leave the machine below this.' },
      { key: 'handlingTempC', label: 'Handling temperature', unit: '°C', kind: 'number', hint: "The cake may be broken out by hand below this. Set it from the machine maker's instructions and the lab's local codes." },
      { key: 'ambientTempC', label: 'Room temperature', unit: '°C', kind: 'number' },
    ],
  },
  {
    title: 'Costs',
    fields: [
      { key: 'hourlyRate', label: 'Machine rate', unit: 'per h', kind: 'number' },
      { key: 'labourHoursPerBuild', label: 'Labour per build', unit: 'h', kind: 'number', hint: 'Setup, breakout and cleaning.' },
      { key: 'labourRate', label: 'Labour rate', unit: 'per h', kind: 'number' },
    ],
  },
];

export const materialFieldGroups: FieldGroup[] = [
  { title: 'Material', fields: [{ key: 'name', label: 'Name', kind: 'text', hint: 'Unique within the lab.' }] },
  {
    title: 'Powder',
    fields: [
      { key: 'solidDensityGPerCm3', label: 'Solid density', unit: 'g/cm³', kind: 'number', hint: 'Of a fused part: gives part mass.' },
      { key: 'bulkDensityGPerCm3', label: 'Bulk density', unit: 'g/cm³', kind: 'number', hint: 'Of packed loose powder: gives the cake mass.' },
      { key: 'refreshRatio', label: 'Refresh ratio', unit: '0–1', kind: 'number', hint: 'Share of fresh powder in each fill, e.g. 0.3' },
      { key: 'pricePerKg', label: 'Price', unit: 'per kg', kind: 'number' },
    ],
  },
  {
    title: 'Sintering',
    fields: [
      { key: 'defaultLayerHeightMm', label: 'Default layer height', unit: 'mm', kind: 'number' },
      { key: 'energyDensityJPerMm2', label: 'Energy density', unit: 'J/mm²', kind: 'number', hint: 'E = P / (v · h)' },
      { key: 'hatchSpacingMm', label: 'Hatch spacing', unit: 'mm', kind: 'number' },
      { key: 'bedTempC', label: 'Bed temperature', unit: '°C', kind: 'number', hint: 'While printing: where cooling starts.' },
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
