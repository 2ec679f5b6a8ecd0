// The invented demo scenario: Heronmere Water Gardens of Larchfield. No real people, companies or places.
export const DEMO_PASSWORD = 'demo-pond-2026'

export const demoCompany = {
  key: 'company',
  name: 'Heronmere Water Gardens',
  currency: 'USD',
  taxRateBasisPoints: 725,
  unitSystem: 'us' as const,
  timeZone: 'America/Chicago',
  /** Invented (555 numbers are reserved for fiction). */
  phone: '(555) 014-2290',
}

export const demoStaff = [
  { key: 'owner', email: 'mara@heronmere.example', name: 'Mara Ellison', role: 'owner' as const },
  { key: 'tech-tess', email: 'tess@heronmere.example', name: 'Tess Okafor', role: 'technician' as const },
  { key: 'tech-dario', email: 'dario@heronmere.example', name: 'Dario Lindqvist', role: 'technician' as const },
]

type Kind = 'household' | 'business' | 'association' | 'public'
interface DemoContact { name: string, email: string | null, phone: string | null, getsReports: boolean, getsInvoices: boolean, getsAlerts: boolean }
interface DemoCustomer {
  key: string, name: string, kind: Kind, email: string, phone: string, notes?: string, tags: string[]
  login?: { email: string, name: string }
  contacts: DemoContact[]
  billing: { line1: string, city: string, postcode: string }
}

const households: Array<[string, string]> = [
  ['whitcombe', 'Priya Whitcombe'], ['brannock', 'Owen Brannock'], ['feldspar', 'Ines Feldspar'],
  ['halloway', 'Gideon Halloway'], ['quillon', 'Marisol Quillon'], ['tamsworth', 'Ruth Tamsworth'],
  ['okonkwo-bey', 'Chidi Okonkwo-Bey'], ['varga', 'Lenke Varga'], ['pellinore', 'Arthur Pellinore'],
  ['sunderby', 'Astrid Sunderby'], ['marchetti', 'Paolo Marchetti'], ['kestrel', 'Jun Kestrel'],
  ['ambrose', 'Delphine Ambrose'], ['rookwood', 'Silas Rookwood'], ['naidu', 'Kavya Naidu'],
  ['ferrant', 'Hugo Ferrant'], ['lisle', 'Beatrix Lisle'], ['ostrander', 'Nils Ostrander'],
  ['calloway', 'Wren Calloway'], ['dunmore', 'Eamon Dunmore'], ['yarrow', 'Tobias Yarrow'],
  ['sato-lind', 'Emi Sato-Lind'], ['garnier', 'Colette Garnier'], ['mbeki-hart', 'Thandi Mbeki-Hart'],
  ['pryce', 'Rhys Pryce'], ['alcott', 'June Alcott'],
]

export const demoCustomers: DemoCustomer[] = [
  ...households.map(([key, name]) => ({
    key: `customer-${key}`,
    name,
    kind: 'household' as const,
    email: key === 'whitcombe' ? 'priya@whitcombe.example' : `${name.split(' ')[0]!.toLowerCase()}@${key}.example`,
    phone: `555-01${String(households.findIndex(h => h[0] === key) + 10).padStart(2, '0')}`,
  })),
  { key: 'customer-ashgrove', name: 'Ashgrove Community Garden', kind: 'public', email: 'office@ashgrove.example', phone: '555-0150', notes: 'Volunteer coordinator meets us at the north gate on Saturdays.' },
  { key: 'customer-lantern-court', name: 'The Lantern Court Hotel', kind: 'business', email: 'facilities@lanterncourt.example', phone: '555-0151', notes: 'Courtyard koi pond; guests present, keep the work area tidy.' },
  { key: 'customer-millbrook-hoa', name: 'Millbrook Commons Homeowners Association', kind: 'association', email: 'board@millbrookcommons.example', phone: '555-0152' },
  { key: 'customer-fernhollow-hoa', name: 'Fern Hollow Homeowners Association', kind: 'association', email: 'manager@fernhollow.example', phone: '555-0153' },
  { key: 'customer-copperleaf', name: 'Copperleaf Dental Studio', kind: 'business', email: 'frontdesk@copperleaf.example', phone: '555-0154' },
  { key: 'customer-larchfield-library', name: 'Larchfield Branch Library', kind: 'public', email: 'grounds@larchfieldlibrary.example', phone: '555-0155' },
].map((c, i): DemoCustomer => ({
  ...c,
  login: { email: c.email, name: c.name },
  tags: c.kind === 'household' ? (i % 3 === 0 ? ['koi'] : []) : [c.kind === 'association' ? 'hoa' : 'commercial'],
  contacts: [
    { name: c.kind === 'household' ? c.name : `${c.name} office`, email: c.email, phone: c.phone, getsReports: true, getsInvoices: true, getsAlerts: true },
    ...(c.kind === 'association' ? [{ name: 'Grounds committee chair', email: `grounds@${c.email.split('@')[1]}`, phone: null, getsReports: true, getsInvoices: false, getsAlerts: true }] : []),
    ...(c.key === 'customer-lantern-court' ? [{ name: 'Accounts payable', email: 'accounts@lanterncourt.example', phone: '555-0161', getsReports: false, getsInvoices: true, getsAlerts: false }] : []),
  ],
  billing: { line1: `${100 + i * 7} ${['Alder Row', 'Bittern Lane', 'Cressway', 'Iris Walk'][i % 4]}`, city: 'Larchfield', postcode: `5${4100 + (i % 9) * 11}` },
}))
