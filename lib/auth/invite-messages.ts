export function inviteProblem(reason: string): string {
  switch (reason) {
    case "expired":
      return "This invite link has expired. Ask your admin to invite you again.";
    case "used":
      return "This invite link was already used. Sign in with the password you set, or ask your admin for a new invite.";
    case "address_taken":
      return "This e-mail address already has a Halftrip account in another organisation. Ask your admin to invite another address.";
    default:
      return "This invite link is not valid. Check that you copied the whole link, or ask your admin for a new invite.";
  }
}
