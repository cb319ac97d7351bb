// The package ships no types: the narrow part of its API the product calls.
declare module '@lhncbc/ucum-lhc' {
  interface ConvertResult {
    status: 'succeeded' | 'failed' | 'error';
    toVal: number | null;
    msg: string[];
  }
  interface UcumLhcUtilsInstance {
    convertUnitTo(
      fromUnitCode: string,
      fromVal: number,
      toUnitCode: string,
      options?: { molecularWeight?: number; charge?: number },
    ): ConvertResult;
    validateUnitString(unit: string): { status: 'valid' | 'invalid' | 'error'; msg: string[] };
  }
  const ucum: { UcumLhcUtils: { getInstance(): UcumLhcUtilsInstance } };
  export default ucum;
}
