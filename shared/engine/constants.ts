/** hc in eV·nm = h·c/e with the exact 2019-SI values (CODATA 2018); 1239.841984 to ten digits. */
export const HC_EV_NM = 1239.8419843320025;

export function wavelengthNmToEnergyEv(wavelengthNm: number): number {
  return HC_EV_NM / wavelengthNm;
}

export function energyEvToWavelengthNm(energyEv: number): number {
  return HC_EV_NM / energyEv;
}
