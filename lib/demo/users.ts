import type { Role } from '@/lib/auth/roles';

// Invented people of the invented Quillfield Equine Reproduction Centre.
export const DEMO_PASSWORD = 'quillfield-demo';

export const DEMO_USERS: { email: string; name: string; role: Role; note: string }[] = [
  { email: 'tech@quillfield.example', name: 'Tamsin Reedway', role: 'technician', note: 'first reads' },
  { email: 'reader@quillfield.example', name: 'Orrin Halvard', role: 'technician', note: 'second reads' },
  { email: 'vet@quillfield.example', name: 'Dr Maren Kettleby', role: 'veterinarian', note: 'sign-off' },
  { email: 'manager@quillfield.example', name: 'Ilse Brackenridge', role: 'lab_manager', note: 'users and settings' },
  { email: 'owner@quillfield.example', name: 'Corwen Ashdale', role: 'client', note: 'stallion owner' },
  { email: 'bryony@fenwarde.example', name: 'Bryony Fenwarde', role: 'client', note: 'another stallion owner' },
];
