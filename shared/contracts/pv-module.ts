/**
 * What every unit's PV module is assumed to be, shared by the simulator (which makes its DC power) and the health
 * engine (which corrects measured DC power to 25 °C before judging soiling).
 */

/**
 * Relative change of a module's DC power per kelvin of module temperature above 25 °C (standard test conditions)
 * [1/K]: −0.37 %/K, common practice for crystalline-silicon modules (datasheets give about −0.3…−0.45 %/K).
 */
export const MODULE_POWER_TEMP_COEFF_PER_K = -0.0037;
