declare module 'autocannon'
