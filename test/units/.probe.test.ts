import { test } from 'vitest';
import { parseQuantity, toUnit, clearUnitCache } from '../../src/units/index.js';
test('probe', () => {
  const show = (s: string, d: any) => { try { console.log(s, JSON.stringify(parseQuantity(s, d))); } catch (e: any) { console.log(s, 'ERR', e.kind, e.message, '|', e.help); } };
  for (const s of ['30 barg','30 bar(g)','30 bar g','30 bara','1 psig','1 psia','1 psi','1 mmHg','1 torr','1 inHg','1 kPag','1 MPag','1 mbarg','30 kg','30','30 kg/h','1 C','1 m'])
    show(s, 'pressure');
  for (const s of ['35 degC','-10 degF','35 °C','35 °F','1 degR','300 K','35 C','35 F','35 R'])
    show(s, 'temperature');
  for (const s of ['1 mol/mol','5 %','5 ppm','3','1 kg/kg']) show(s, 'dimensionless');
  for (const s of ['1 t/d','1 t/h','1 lb/h','1 ton/h','1 kg/h']) show(s, 'massFlow');
  for (const s of ['12.6 m3/h','1 acfm','1 ft3/min','1 L/min','1 dm3/h','1 m³/h','1 Nm3/h', '1 gal/min']) show(s, 'volumeFlow');
  for (const s of ['1 Nm3/h','1 Nm^3/h','1 SCFM','1 MMSCFD','1 m3/h@normal','1 m3/h @ plant','1 m3/h','1 Sm3/d','1 NL/min']) show(s, 'standardFlow');
  for (const s of ['1 lbmol/h','1.5e3 kmol/h','1 kmol/h']) show(s, 'molarFlow');
  for (const s of ['1 d','1 h','1 min']) show(s, 'time');
  for (const s of ['1 lb/lbmol','1 kg/kmol']) show(s, 'molarMass');
  for (const s of ['1 ft3/lbmol','1 L/mol']) show(s, 'molarVolume');
  for (const s of ['1 lb/ft3','1 g/cm3']) show(s, 'density');
  show('1,5 bar','pressure'); show('NaN bar','pressure'); show('1e999 bar','pressure'); show('bar','pressure');
  console.log(toUnit(1, 'molarFlow', 'kmol/h'), toUnit(201325, 'pressure', 'barg'));
});
