/**
 * Handling fine polymer powder at the shelf, the sieve and the hopper.
 * General guidance only: local codes and the machine and powder makers'
 * instructions come first.
 */
export const POWDER_CAUTIONS = [
  {
    id: 'respirator',
    title: 'Breathing and skin',
    text: 'Wear a respirator (N95 / FFP2 or better), gloves and eye protection when you open bags, sieve, mix or fill.',
  },
  {
    id: 'ignition',
    title: 'Combustible dust',
    text: 'No ignition sources near sieves, mixers and vacuums: no open flames, hot work or sparking tools. Keep surfaces free of dust layers; use the approved vacuum, never compressed air.',
  },
  {
    id: 'grounding',
    title: 'Static electricity',
    text: 'Ground and bond sieves, containers and scoops before pouring: moving powder charges them, and a spark can ignite a dust cloud.',
  },
] as const;

export const POWDER_CAUTION_SOURCE = 'In the US: NFPA 652 and NFPA 654 (combustible dust); elsewhere your local codes.';
export const POWDER_DEFERRAL = "This is general guidance: your lab's local codes and the machine and powder makers' instructions come first.";
