// The invented demo school. Every name here is made up for the demo.
export const DEMO_PASSWORD = "fretcall-demo";

export const DEMO_SCHOOL = {
  id: "demo-larkspur",
  name: "Larkspur Lane Community Music School",
  admin: { id: "demo-admin", displayName: "Odile Marchbanks", email: "admin@larkspur.example" },
  teachers: [
    { id: "demo-teacher-rafe", displayName: "Rafe Okonkwo-Lind", email: "rafe@larkspur.example" },
    { id: "demo-teacher-saoirse", displayName: "Saoirse Vantongeren", email: "saoirse@larkspur.example" },
  ],
  classes: [
    { id: "demo-class-tue", name: "Tuesday Beginners", joinCode: "TUEBEG", teacher: "demo-teacher-rafe" },
    { id: "demo-class-thu", name: "Thursday Improvers", joinCode: "THUIMP", teacher: "demo-teacher-rafe" },
    { id: "demo-class-sat", name: "Saturday Youth Guitar", joinCode: "SATYTH", teacher: "demo-teacher-saoirse" },
  ],
  // First name and initial only: the least a class register needs. One student signs in with e-mail.
  students: [
    ["Amani K.", "demo-class-tue"], ["Bram T.", "demo-class-tue"], ["Cosima R.", "demo-class-tue"],
    ["Dario F.", "demo-class-tue"], ["Elif S.", "demo-class-tue"], ["Fintan O.", "demo-class-tue"],
    ["Greta W.", "demo-class-tue"], ["Hollis B.", "demo-class-tue"], ["Ilse M.", "demo-class-thu"],
    ["Jovan P.", "demo-class-thu"], ["Kaia D.", "demo-class-thu"], ["Leandro V.", "demo-class-thu"],
    ["Maren A.", "demo-class-thu"], ["Nico H.", "demo-class-thu"], ["Oona L.", "demo-class-thu"],
    ["Priya N.", "demo-class-thu"], ["Quill E.", "demo-class-sat"], ["Rosalind C.", "demo-class-sat"],
    ["Sami J.", "demo-class-sat"], ["Tove G.", "demo-class-sat"], ["Ulla Z.", "demo-class-sat"],
    ["Viggo Y.", "demo-class-sat"], ["Wren I.", "demo-class-sat"], ["Xavi U.", "demo-class-sat"],
    ["Yusra Q.", "demo-class-sat"],
  ] as const,
  studentWithSignIn: { index: 0, email: "amani@larkspur.example" },
} as const;
