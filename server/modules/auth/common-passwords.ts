// The most common passwords of leaked-password lists (common practice: refuse them outright).
// Only entries that pass the length rule matter; shorter ones are refused by length already.
const COMMON = `
password password1 password12 password123 password1234 passw0rd p@ssw0rd p@ssword123 passwordpassword
1234567890 12345678910 123456789a 0123456789 0987654321 9876543210 1111111111 0000000000 1234512345
1q2w3e4r5t 1qaz2wsx3edc qwertyuiop qwerty12345 qwerty123456 qwertyuiop123 asdfghjkl asdfghjkl1 zxcvbnm123
iloveyou123 iloveyou12 princess123 sunshine123 football123 baseball123 basketball superman123 batman1234
welcome123 welcome1234 letmein123 letmein1234 trustno1234 starwars123 dragon12345 monkey12345 shadow12345
master12345 michael123 jennifer123 computer123 internet123 whatever123 freedom123 changeme123 changeme
administrator admin12345 admin123456 adminadmin rootroot123 qazwsxedc qazwsxedcrfv abcdefghij abcd123456
abc1234567 abcdef1234 aaaaaaaaaa 1234qwerasdf qwer1234asdf zaq12wsxcde zaq1zaq1zaq1 mypassword mypassword1
secret1234 secretpassword loveyou1234 hello12345 hellohello helloworld helloworld1 testtest123 test123456
`;

const SET = new Set(COMMON.split(/\s+/).filter(Boolean));

/** True for a password found on the common list (case-insensitive) or one made of a single repeated character. */
export function isCommonPassword(password: string): boolean {
  const p = password.toLowerCase();
  return SET.has(p) || /^(.)\1+$/.test(p) || p.includes('roostline');
}
