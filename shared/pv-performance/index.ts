/** PV performance figures for statements: IEC 61724-1 yields and PR, energy integration, availability, local months. */
export * from './yields-iec-61724-1';
export * from './energy-integration';
export * from './availability';
export * from './calendar-month';
export * from './mount-twins';
