/** A sender holds the delivery right now: it cannot be sent again until the attempt ends. */
export class DeliveryBusyError extends Error {
  constructor() {
    super('This report is being sent to the EHR right now; look again in a minute.');
    this.name = 'DeliveryBusyError';
  }
}
