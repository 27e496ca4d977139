// Plain-words cautions shown on the help page and in report footers.
export const CAUTIONS: { title: string; text: string }[] = [
  {
    title: 'Handling stallions during collection',
    text: 'Stallions can strike, kick, rear or mount without warning. Collection needs trained handlers, suitable restraint, non-slip footing and a clear retreat route for everyone present.',
  },
  {
    title: 'Biological samples',
    text: 'Semen can carry venereal infections. Wear gloves, avoid splashes, dispose of samples as biohazard waste and disinfect microscope stages and counting chambers after use.',
  },
  {
    title: 'Fixatives and chemicals',
    text: 'Formaldehyde and formol saline are carcinogenic and sensitising: use ventilation, nitrile gloves and eye protection, and keep the safety data sheets at hand. Methanol fixatives are flammable and toxic.',
  },
  {
    title: 'Liquid nitrogen and glass',
    text: 'Liquid nitrogen burns skin and can displace oxygen in closed rooms. Broken slides and cover slips go in sharps containers.',
  },
  {
    title: 'Decisions',
    text: 'Morphology figures and semen arithmetic support, and never replace, a veterinarian’s judgement. Breeding and treatment decisions follow local regulations and licensed veterinary practice.',
  },
];
