/** The version printed by --version and written into SARIF reports. */
export const VERSION = "0.1.0";
