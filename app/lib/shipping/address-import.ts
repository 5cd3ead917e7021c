/** The columns of an address import, as the instructor's file and the template name them. */
import { addressFields } from "./address-schema";

export const addressImportColumns = ["email", ...addressFields] as const;

export const addressTemplateCsv = [
  addressImportColumns.join(","),
  "ada.student@example.edu,Ada Student,12 Kiln Street,Flat 2,Fernwick,,FW1 2AB,GB,",
  "sam.student@example.edu,,40 Weir Road,,Fernwick,NY,12345,US,+1 555 0100",
].join("\r\n");
