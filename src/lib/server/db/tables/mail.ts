/** Tables of the mail concern (created by its migration in /migrations). */
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface MailTables {}
