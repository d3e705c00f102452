'use strict';
// Invented names for the demo at the fictional Northmere University. Not a seeder (no timestamp prefix).
module.exports = {
  DEMO_PASSWORD: 'northmere-demo-26',
  FIRST_NAMES: ['Amara', 'Bram', 'Celeste', 'Dario', 'Elin', 'Fintan', 'Gwen', 'Hideo', 'Ines', 'Jules', 'Kofi', 'Lior',
    'Maren', 'Nikhil', 'Orla', 'Pavel', 'Quinn', 'Rhea', 'Soren', 'Talia', 'Umar', 'Vesna', 'Wren', 'Xavi', 'Yara', 'Zeno'],
  LAST_NAMES: ['Abernethy', 'Brightwater', 'Calloway', 'Dunmore', 'Eskildsen', 'Fairholm', 'Galloway', 'Hartigan', 'Ivers',
    'Jessop', 'Kettleby', 'Lamonte', 'Marchetti', 'Northcott', 'Okafor', 'Pennick', 'Quarles', 'Rowntree', 'Sallis',
    'Thackeray', 'Ulverston', 'Varga', 'Whitlock', 'Yeardley', 'Zamora'],
};
