declare module 'stripe-stateful-mock'
